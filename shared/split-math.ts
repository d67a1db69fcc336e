/**
 * Formulas inside running text: where they are (explicit `$…$`, or words in the engine's TeX-like notation
 * such as e^{iαx}) and their TeX for KaTeX. Used by the client's MathText and by report.html. Pure strings.
 */
/** Unicode the engine writes in its formulas → TeX KaTeX reads. */
const TEX: [RegExp, string][] = [
  [/²/g, '^2'],
  [/³/g, '^3'],
  [/⁻¹/g, '^{-1}'],
  [/ᵀ/g, '^\\mathsf{T}'],
  [/−/g, '-'],
  [/·/g, '\\cdot '],
  [/⟨/g, '\\langle '],
  [/⟩/g, '\\rangle '],
  [/√/g, '\\sqrt'],
  [/ℓ/g, '\\ell '],
  [/φ/g, '\\varphi '],
];

export function toTex(formula: string): string {
  let tex = formula;
  for (const [pattern, replacement] of TEX) tex = tex.replace(pattern, replacement);
  return tex;
}

export type MathPart = { math: boolean; text: string };

/** A whitespace-separated word that is a formula: it has a TeX sub- or superscript (e^{iαx}, j'_{ℓ,1}, J_ℓ²). */
const FORMULA_WORD = /[\^_](?:\{[^}\s]*\}|[A-Za-zℓ0-9](?![A-Za-z_]))/;
/** Words that look like formulas but are names: files (phase_a.npy) and design keys (snake_case). */
const NOT_FORMULA = /\.(?:npy|png|json|csv|gds|zip)\b|^[a-z]+(?:_[a-z]+){2,}$/;

/**
 * Splits text into prose and formulas: `$…$` marks a formula explicitly; otherwise words written in TeX
 * notation (e^{iαx}, J_ℓ²(k …) are formulas, and formula words joined by + or − stay one formula.
 * Example: splitMath('phase $e^{iφ}$ here') → [prose 'phase ', math 'e^{iφ}', prose ' here'].
 */
export function splitMath(text: string): MathPart[] {
  const parts: MathPart[] = [];
  const push = (math: boolean, piece: string) => {
    if (!piece) return;
    const last = parts[parts.length - 1];
    if (last && last.math === math && !math) last.text += piece;
    else parts.push({ math, text: piece });
  };
  const explicit = text.split(/\$([^$]+)\$/);
  explicit.forEach((chunk, i) => {
    if (i % 2 === 1) return push(true, chunk);
    let formula = '';
    let pending = '';
    const flush = () => {
      if (formula) push(true, formula);
      push(false, pending);
      formula = '';
      pending = '';
    };
    for (const word of chunk.split(/(\s+)/)) {
      if (!word) continue;
      if (/^\s+$/.test(word) || /^[−+=/·]$/.test(word)) {
        if (formula) pending += word;
        else push(false, word);
      } else if (FORMULA_WORD.test(word) && !NOT_FORMULA.test(word)) {
        const [, body, trailing] = /^(.*?)([,;:.]?)$/.exec(word)!;
        formula = formula ? `${formula}${pending}${body}` : body;
        pending = '';
        if (trailing) {
          flush();
          push(false, trailing);
        }
      } else {
        flush();
        push(false, word);
      }
    }
    flush();
  });
  return parts;
}
