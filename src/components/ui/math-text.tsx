import katex from 'katex';
import 'katex/dist/katex.min.css';
import { Fragment, useMemo } from 'react';
import { splitMath, toTex } from '@shared/split-math';

/** Text whose formulas (see splitMath) are typeset with KaTeX; anything KaTeX cannot read stays as written. */
export function MathText({ text }: { text: string }) {
  const parts = useMemo(() => splitMath(text), [text]);
  return (
    <>
      {parts.map((part, i) => {
        if (!part.math) return <Fragment key={i}>{part.text}</Fragment>;
        let html: string;
        try {
          html = katex.renderToString(toTex(part.text), { throwOnError: true, strict: 'ignore', output: 'htmlAndMathml' });
        } catch {
          return <Fragment key={i}>{part.text}</Fragment>;
        }
        return <span key={i} className="math" dangerouslySetInnerHTML={{ __html: html }} />;
      })}
    </>
  );
}
