/**
 * The approximate demo library against RCWA (README "Demo library against RCWA"): a few demo atoms recomputed by
 * `computeAtom` with the same pillars, materials, λ and P, light through the substrate (the side the demo assumes),
 * at two harmonic counts; then every atom of the demo library at the first count, summarized, at the demo's period
 * and at others (the demo library made for that period). Prints Markdown rows and figures; asserts nothing.
 * Run: `npx tsx bench/demo-vs-rcwa.ts [harmonics] [finer harmonics] [periods nm, comma-separated | none]`
 * (default 11 21 450,400).
 */
import { loadavg } from 'node:os';
import { demoAtomLibrary } from '../shared/optics/demo-library';
import { demoAgainstRcwa } from '../shared/optics/demo-rcwa';

const IDS = ['empty', 'w120-l120', 'w200-l200', 'w300-l300', 'w400-l400', 'w180-l320', 'w150-l350', 'w250-l300'];

const harmonics = Number(process.argv[2] ?? 11);
const finer = Number(process.argv[3] ?? 21);
const periods = (process.argv[4] ?? '450,400') === 'none' ? [] : (process.argv[4] ?? '450,400').split(',').map(Number);
const library = demoAtomLibrary();
const f3 = (v: number): string => v.toFixed(3);
const signed = (v: number): string => (v >= 0 ? '+' : '−') + Math.abs(v).toFixed(2);
console.log(`Demo library against RCWA; light through the substrate; load ${loadavg().map((v) => v.toFixed(2)).join(', ')}, 2 cores`);
console.log(`| atom | t_x demo / RCWA | t_y demo / RCWA | α_x demo / RCWA (Δ) | α_y demo / RCWA (Δ) | T₀ x, y | other orders x, y: from substrate / onto pillars | R x, y (zeroth order) | Δt, Δα ${harmonics}→${finer} |`);
console.log('|---|---|---|---|---|---|---|---|---|');
for (const id of finer > 0 ? IDS : []) {
  const atom = library.atoms.find((a) => a.id === id);
  if (!atom) throw new Error(`no atom ${id} in the demo library`);
  const r = demoAgainstRcwa(library, atom, harmonics, 'substrate');
  const top = demoAgainstRcwa(library, atom, harmonics, 'superstrate');
  const fine = demoAgainstRcwa(library, atom, finer, 'substrate');
  const dt = Math.max(Math.abs(fine.rcwa.tx - r.rcwa.tx), Math.abs(fine.rcwa.ty - r.rcwa.ty));
  const wrap = (a: number) => Math.abs(a - 2 * Math.PI * Math.round(a / (2 * Math.PI)));
  const da = Math.max(wrap(fine.rcwa.alphaX - r.rcwa.alphaX), wrap(fine.rcwa.alphaY - r.rcwa.alphaY));
  console.log(
    `| ${id} | ${f3(r.demo.tx)} / ${f3(r.rcwa.tx)} | ${f3(r.demo.ty)} / ${f3(r.rcwa.ty)} | ${f3(r.demo.alphaX)} / ${f3(r.rcwa.alphaX)} (${signed(r.difference.alphaX)}) | ` +
      `${f3(r.demo.alphaY)} / ${f3(r.rcwa.alphaY)} (${signed(r.difference.alphaY)}) | ${f3(r.x.zeroOrder)}, ${f3(r.y.zeroOrder)} | ` +
      `${f3(r.x.otherOrders)}, ${f3(r.y.otherOrders)} / ${f3(top.x.otherOrders)}, ${f3(top.y.otherOrders)} | ${f3(r.x.reflected)}, ${f3(r.y.reflected)} (${f3(r.x.zeroOrderReflected)}, ${f3(r.y.zeroOrderReflected)}) | ${dt.toFixed(3)}, ${da.toFixed(3)} |`,
  );
}

for (const periodNm of periods) summarize(demoAtomLibrary({ period: periodNm * 1e-9 }), periodNm);

function summarize(library: ReturnType<typeof demoAtomLibrary>, periodNm: number): void {
  const t0 = performance.now();
  let sumT0 = 0;
  let sumDemoT = 0;
  let sumDa = 0;
  let worstDa = 0;
  let below = 0;
  for (const atom of library.atoms) {
    const r = demoAgainstRcwa(library, atom, harmonics, 'substrate');
    for (const [t0x, demoT, da] of [
      [r.x.zeroOrder, r.demo.tx ** 2, Math.abs(r.difference.alphaX)],
      [r.y.zeroOrder, r.demo.ty ** 2, Math.abs(r.difference.alphaY)],
    ]) {
      sumT0 += t0x;
      sumDemoT += demoT;
      sumDa += da;
      worstDa = Math.max(worstDa, da);
      if (t0x < 0.8) below++;
    }
  }
  const n = 2 * library.atoms.length;
  console.log(
    `\nP = ${periodNm} nm, all ${library.atoms.length} demo atoms at ${harmonics}×${harmonics} (x and y): zeroth-order transmittance mean ${f3(sumT0 / n)} by RCWA against ${f3(sumDemoT / n)} ` +
      `by the model (t²); ${below} of ${n} below 0.8; |Δα| mean ${f3(sumDa / n)} rad, largest ${f3(worstDa)} rad; ${((performance.now() - t0) / 1000).toFixed(0)} s on one thread`,
  );
}
