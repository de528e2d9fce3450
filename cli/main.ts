// iontrail command dispatch. Each command lives in cli/commands/NAME.ts and exports
// `describe` (one line for the help) and `run(argv)` returning the exit code.

import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { isUserError } from './errors.js';
import { closest } from './args.js';

export interface Command {
  describe: string;
  run(argv: string[]): Promise<number>;
}

const commandsDir = join(dirname(fileURLToPath(import.meta.url)), 'commands');

function commandNames(): string[] {
  return readdirSync(commandsDir)
    .filter((f) => /\.(js|ts)$/.test(f) && !f.endsWith('.d.ts'))
    .map((f) => f.replace(/\.(js|ts)$/, ''))
    .sort();
}

async function loadCommand(name: string): Promise<Command> {
  const ext = import.meta.url.endsWith('.ts') ? '.ts' : '.js';
  return (await import(join(commandsDir, name + ext))) as Command;
}

async function help(): Promise<string> {
  const lines = ['usage: iontrail COMMAND [options]', '', 'commands:'];
  for (const name of commandNames()) {
    const cmd = await loadCommand(name);
    lines.push(`  ${name.padEnd(8)} ${cmd.describe}`);
  }
  lines.push('', 'iontrail COMMAND --help shows the options of one command.');
  return lines.join('\n') + '\n';
}

export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(await help());
    return name === undefined ? 2 : 0;
  }
  if (name === '--version') {
    process.stdout.write(`iontrail ${(await import('../sim/version.js')).TOOL_VERSION}\n`);
    return 0;
  }
  const names = commandNames();
  if (!names.includes(name)) {
    const hint = closest(name, names);
    process.stderr.write(`iontrail: unknown command '${name}'${hint ? ` (did you mean '${hint}'?)` : ''}; try iontrail --help\n`);
    return 2;
  }
  try {
    const cmd = await loadCommand(name);
    return await cmd.run(rest);
  } catch (err) {
    if (isUserError(err)) {
      // Messages may already start with the command name ("check: --rf ..."): say it once.
      const line = err.message.split('\n')[0].replace(new RegExp(`^${name}: `), '');
      process.stderr.write(`iontrail ${name}: ${line}\n`);
      return 2;
    }
    throw err;
  }
}
