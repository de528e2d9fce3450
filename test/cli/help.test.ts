// `--help` of the commands that run scenes describes every option the parser accepts: each value
// flag and switch as --name at the start of a help line, each short alias as -x.

import { describe, expect, it } from 'vitest';
import { iontrail } from '../helpers/cli.js';
import type { FlagSpec } from '../../cli/args.js';
import * as runCmd from '../../cli/commands/run.js';
import * as sweepCmd from '../../cli/commands/sweep.js';
import * as reportCmd from '../../cli/commands/report.js';
import * as demoCmd from '../../cli/commands/demo.js';

const COMMANDS: [string, FlagSpec][] = [['run', runCmd.FLAGS], ['sweep', sweepCmd.FLAGS], ['report', reportCmd.FLAGS], ['demo', demoCmd.FLAGS]];

describe('--help lists every flag', () => {
  for (const [name, spec] of COMMANDS) {
    it(`iontrail ${name} --help`, () => {
      const r = iontrail([name, '--help']);
      expect(r.code).toBe(0);
      const described = r.stdout.split('\n').filter((l) => /^\s+-/.test(l)).map((l) => l.trim());
      const flags = [...spec.values, ...(spec.switches ?? [])];
      expect(flags.length).toBeGreaterThan(3);
      for (const f of flags) {
        // A line that starts with the flag (possibly after its alias) and says something after it.
        const line = described.find((l) => new RegExp(`^(-\\w, )?--${f}\\b`).test(l));
        expect(line, `--${f} in iontrail ${name} --help`).toBeDefined();
        expect(line!.replace(/^(-\w, )?--[\w-]+( [A-Z=.,a-z_:|]+)?\s*/, '').length, `--${f} has a description`).toBeGreaterThan(8);
      }
      for (const [short, long] of Object.entries(spec.aliases ?? {})) {
        expect(described.some((l) => l.startsWith(`-${short}, --${long}`)), `-${short} in iontrail ${name} --help`).toBe(true);
      }
      // -h gives the same text as --help.
      expect(iontrail([name, '-h']).stdout).toBe(r.stdout);
    });
  }
});
