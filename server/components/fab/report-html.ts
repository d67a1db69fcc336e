/**
 * The design report as one standalone HTML file (inline CSS, no scripts, no external resources; formulas as
 * MathML), with
 * print CSS so a browser prints it cleanly to PDF. The previews are the PNG files next to it in the
 * fab package (previews/…), referenced by relative path.
 */
import katex from 'katex';
import type { ReportModel } from '../../../shared/report/design-report';
import { splitMath, toTex } from '../../../shared/split-math';

const escape = (text: string) =>
  text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/**
 * Text with its formulas (shared/split-math.ts) as MathML — for the tables of metrics, never for what people wrote, which browsers draw without scripts, fonts or CSS;
 * a formula KaTeX cannot read stays as written.
 */
function withMath(text: string): string {
  return splitMath(text)
    .map((part) => {
      if (!part.math) return escape(part.text);
      try {
        return katex.renderToString(toTex(part.text), { output: 'mathml', throwOnError: true, strict: 'ignore' });
      } catch {
        return escape(part.text);
      }
    })
    .join('');
}

const STYLE = `
body{font-family:system-ui,-apple-system,"Segoe UI",sans-serif;color:#1c2430;margin:2rem auto;max-width:60rem;padding:0 1rem;line-height:1.45}
h1{font-size:1.6rem;margin:0}h2{font-size:1.15rem;border-bottom:1px solid #c9d1db;padding-bottom:.2rem;margin-top:1.8rem}
.sub{color:#4b5666;margin:.3rem 0 1.2rem}table{border-collapse:collapse;width:100%;font-size:.88rem}
th,td{border:1px solid #d5dbe3;padding:.25rem .45rem;text-align:left;vertical-align:top}th{background:#f1f4f7}
dl{display:grid;grid-template-columns:max-content 1fr;gap:.2rem 1rem;margin:0}dt{font-weight:600}dd{margin:0}
.caution{border:2px solid #b45309;background:#fff7ed;padding:.6rem .8rem;margin:.6rem 0;border-radius:4px}
figure{display:inline-block;margin:.4rem;width:14rem;vertical-align:top}figure img{width:100%;image-rendering:pixelated;border:1px solid #d5dbe3}
figcaption{font-size:.78rem;color:#4b5666}
@media print{body{margin:0;max-width:none}h2{break-after:avoid}table,figure,.caution{break-inside:avoid}@page{margin:15mm}}
`;

export function reportHtml(model: ReportModel, previews: { file: string; caption: string }[], exportNote: string): string {
  const out: string[] = [];
  out.push('<!doctype html><html lang="en"><head><meta charset="utf-8">');
  out.push(`<title>${escape(model.title)}</title><style>${STYLE}</style></head><body>`);
  out.push(`<h1>${escape(model.title)}</h1><p class="sub">${escape(model.subtitle)}</p>`);
  out.push(`<p class="sub">${escape(exportNote)}</p>`);
  for (const c of model.cautions) out.push(`<div class="caution"><strong>${escape(c.title)}.</strong> ${escape(c.text)}</div>`);
  for (const s of model.sections) {
    out.push(`<section id="${escape(s.id)}"><h2>${escape(s.title)}</h2>`);
    if (s.rows.length) out.push(`<dl>${s.rows.map(([k, v]) => `<dt>${escape(k)}</dt><dd>${escape(v)}</dd>`).join('')}</dl>`);
    for (const p of s.paragraphs) out.push(`<p>${escape(p)}</p>`);
    if (s.table) {
      out.push(`<table><thead><tr>${s.table.head.map((h) => `<th>${escape(h)}</th>`).join('')}</tr></thead><tbody>`);
      for (const row of s.table.rows) out.push(`<tr>${row.map((cell) => `<td>${withMath(cell)}</td>`).join('')}</tr>`);
      out.push('</tbody></table>');
    }
    out.push('</section>');
  }
  if (previews.length) {
    out.push('<section id="previews"><h2>Previews</h2>');
    for (const p of previews) out.push(`<figure><img src="${escape(p.file)}" alt="${escape(p.caption)}"><figcaption>${escape(p.caption)}</figcaption></figure>`);
    out.push('</section>');
  }
  out.push('</body></html>\n');
  return out.join('\n');
}
