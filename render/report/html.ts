// report.html: one self-contained file — CSS inline, figures inline as base64 PNG data URIs, no
// script, no link to any other file or host — so it opens offline and can be mailed as it is.
// Every string is escaped (including '/' and ':' so text from a scene cannot form a URL).

import type { Block, ReportDoc } from './document.js';

const ESC: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;', '/': '&#47;', ':': '&#58;', '`': '&#96;', '=': '&#61;' };

/** Text → HTML text or attribute value (OWASP rule #1 characters, plus '/', ':', '=' and '`'). */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"'/:`=]/g, (c) => ESC[c]);
}

const CSS = `
:root { --ink: #1f2328; --soft: #5c636e; --rule: #d8dbe0; --band: #f3f5f7; --accent: #0b5d8a; --warn-bg: #fff6e0; --warn: #8a5a00; }
* { box-sizing: border-box; }
body { margin: 0; color: var(--ink); background: #ffffff; font: 15px/1.45 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; }
main { max-width: 1180px; margin: 0 auto; padding: 28px 32px 48px; }
header { border-bottom: 3px solid var(--accent); padding-bottom: 12px; margin-bottom: 18px; }
h1 { font-size: 26px; margin: 0 0 4px; overflow-wrap: anywhere; }
.sub { color: var(--soft); margin: 0; }
nav { font-size: 13px; color: var(--soft); margin-top: 8px; }
nav a { color: var(--accent); text-decoration: none; margin-right: 14px; }
h2 { font-size: 19px; margin: 30px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); }
table { border-collapse: collapse; margin: 8px 0 14px; font-size: 13.5px; width: auto; max-width: 100%; }
.tablewrap { overflow-x: auto; }
caption { text-align: left; color: var(--soft); padding: 2px 0 6px; font-size: 13px; }
th, td { border-bottom: 1px solid var(--rule); padding: 5px 10px; text-align: left; vertical-align: top; }
th { background: var(--band); font-weight: 600; vertical-align: bottom; }
th.n { text-align: right; }
td.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.cautions { background: var(--warn-bg); border-left: 5px solid var(--warn); padding: 10px 16px; margin: 6px 0; }
.cautions p { margin: 4px 0; }
.cautions strong { color: var(--warn); }
figure { margin: 18px 0 26px; }
figure img { display: block; max-width: 100%; height: auto; border: 1px solid var(--rule); }
figcaption { color: var(--soft); font-size: 13px; margin-top: 6px; }
figcaption b { color: var(--ink); }
ul { padding-left: 22px; }
li { margin: 3px 0; }
footer { margin-top: 36px; color: var(--soft); font-size: 12px; border-top: 1px solid var(--rule); padding-top: 8px; }
@media print { main { max-width: none; padding: 0; } figure { break-inside: avoid; } }
`;

function block(b: Block, images: Map<string, string>): string {
  switch (b.kind) {
    case 'p': return b.strong ? `<p class="verdict"><strong>${escapeHtml(b.text)}</strong></p>` : `<p>${escapeHtml(b.text)}</p>`;
    case 'list': return `<ul>${b.items.map((i) => `<li>${escapeHtml(i)}</li>`).join('')}</ul>`;
    case 'cautions': return `<div class="cautions">${b.items.map((i, k) => `<p>${k === 0 ? '<strong>Caution.</strong> ' : ''}${escapeHtml(i)}</p>`).join('')}</div>`;
    case 'table': {
      const cls = (i: number) => (b.numeric?.[i] ? ' class="n"' : '');
      const head = `<tr>${b.head.map((h, i) => `<th${cls(i)}>${escapeHtml(h)}</th>`).join('')}</tr>`;
      const rows = b.rows.map((r) => `<tr>${r.map((c, i) => `<td${cls(i)}>${escapeHtml(c)}</td>`).join('')}</tr>`).join('\n');
      return `<div class="tablewrap"><table>${b.caption ? `<caption>${escapeHtml(b.caption)}</caption>` : ''}<thead>${head}</thead><tbody>\n${rows}\n</tbody></table></div>`;
    }
    case 'figure': {
      const f = b.figure;
      const data = images.get(f.id);
      if (data === undefined) throw new Error(`report: figure ${f.id} has no image data`);
      return `<figure id="fig-${escapeHtml(f.id)}"><img src="data:image/png;base64,${data}" width="${f.width}" height="${f.height}" alt="Figure ${f.number}: ${escapeHtml(f.title)}"><figcaption><b>Figure ${f.number}. ${escapeHtml(f.title)}.</b> ${escapeHtml(f.caption)}</figcaption></figure>`;
    }
  }
}

/** The whole page. `images` maps figure id → PNG bytes. */
export function reportHtml(doc: ReportDoc, images: Map<string, Uint8Array>): string {
  const b64 = new Map([...images].map(([k, v]) => [k, Buffer.from(v).toString('base64')]));
  const nav = doc.sections.map((s) => `<a href="#${escapeHtml(s.id)}">${escapeHtml(s.title)}</a>`).join('');
  const body = doc.sections.map((s) => `<section id="${escapeHtml(s.id)}"><h2>${escapeHtml(s.title)}</h2>\n${s.blocks.map((b) => block(b, b64)).join('\n')}\n</section>`).join('\n');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">
<title>${escapeHtml(doc.title)} — design review</title>
<style>${CSS}</style>
</head>
<body>
<main>
<header><h1>${escapeHtml(doc.title)}</h1><p class="sub">${escapeHtml(doc.subtitle)}</p><nav>${nav}</nav></header>
${body}
<footer>${escapeHtml('Generated by iontrail from the run in this bundle; every number above is read from results.json. Simulated values: verify on the bench.')}</footer>
</main>
</body>
</html>
`;
}
