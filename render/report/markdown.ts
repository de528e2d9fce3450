// report.md: the same document as Markdown (CommonMark with GFM tables), figures as relative links
// to the fig-*.png files beside it. Text is escaped so a scene name cannot inject markup.

import type { Block, ReportDoc } from './document.js';

/** Escape Markdown and inline-HTML specials in plain text. */
export function escapeMarkdown(text: string): string {
  return text
    .replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;')
    // Emphasis, code, link brackets, table pipes and strike-through; parentheses only matter after ']'.
    .replace(/([\\`*_\[\]|~])/g, '\\$1')
    .replace(/\n/g, ' ');
}

function block(b: Block): string {
  switch (b.kind) {
    case 'p': if (b.strong) return `**${escapeMarkdown(b.text)}**`;
      return escapeMarkdown(b.text);
    case 'list': return b.items.map((i) => `- ${escapeMarkdown(i)}`).join('\n');
    case 'cautions': return b.items.map((i, k) => `> ${k === 0 ? '**Caution.** ' : ''}${escapeMarkdown(i)}`).join('\n>\n');
    case 'table': {
      const cap = b.caption ? `${escapeMarkdown(b.caption)}\n\n` : '';
      const head = `| ${b.head.map(escapeMarkdown).join(' | ')} |`;
      const rule = `|${b.head.map((_, i) => (b.numeric?.[i] ? ' ---: ' : ' --- ')).join('|')}|`;
      const rows = b.rows.map((r) => `| ${r.map((c) => escapeMarkdown(c) || ' ').join(' | ')} |`);
      return cap + [head, rule, ...rows].join('\n');
    }
    case 'figure': {
      const f = b.figure;
      return `![Figure ${f.number}: ${escapeMarkdown(f.title)}](${f.file})\n\n**Figure ${f.number}. ${escapeMarkdown(f.title)}.** ${escapeMarkdown(f.caption)}`;
    }
  }
}

export function reportMarkdown(doc: ReportDoc): string {
  const parts = [`# ${escapeMarkdown(doc.title)}`, escapeMarkdown(doc.subtitle)];
  for (const s of doc.sections) {
    parts.push(`## ${escapeMarkdown(s.title)}`);
    for (const b of s.blocks) parts.push(block(b));
  }
  return parts.join('\n\n') + '\n';
}
