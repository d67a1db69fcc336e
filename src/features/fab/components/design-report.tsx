import type { ReportModel } from '@shared/report/design-report';
import { FULL_VIEW, PictureAxes, type PictureAxesSpec } from '@/components/ui/picture-axes';
import { apiUrl } from '@/lib/api-client';
import { MathText } from '@/components/ui/math-text';

/** The design report on screen and on paper: the same model as report.html in the fab package. */
export function DesignReport({ model, projectId, runId, previews }: { model: ReportModel; projectId: number; runId: number; previews: { name: string; label: string; frame?: PictureAxesSpec }[] }) {
  return (
    <article className="design-report mx-auto max-w-4xl bg-card p-8 text-ink print:max-w-none print:p-0">
      <h1 className="text-2xl font-extrabold">{model.title}</h1>
      <p className="mt-1 text-sm text-ink-soft">{model.subtitle}</p>
      {model.cautions.map((c) => (
        <div key={c.title} className="mt-3 rounded-lg border-2 border-amber-700 bg-amber-50 px-3 py-2 text-sm break-inside-avoid" role="note">
          <strong>{c.title}.</strong> {c.text}
        </div>
      ))}
      {model.sections.map((s) => (
        <section key={s.id} className="mt-6 break-inside-avoid-page" aria-labelledby={`report-${s.id}`}>
          <h2 id={`report-${s.id}`} className="border-b border-line pb-1 text-lg font-extrabold break-after-avoid">
            {s.title}
          </h2>
          {s.rows.length ? (
            <dl className="mt-2 grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
              {s.rows.map(([k, v]) => (
                <div key={k} className="contents">
                  <dt className="font-bold">{k}</dt>
                  <dd className="tabular-nums">{v}</dd>
                </div>
              ))}
            </dl>
          ) : null}
          {s.paragraphs.map((p) => (
            <p key={p} className="mt-2 text-sm">
              {p}
            </p>
          ))}
          {s.table ? (
            <table className="mt-2 w-full border-collapse text-xs">
              <thead>
                <tr>
                  {s.table.head.map((h) => (
                    <th key={h} className="border border-line bg-paper-deep px-2 py-1 text-left">
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {s.table.rows.map((row, r) => (
                  <tr key={r} className="break-inside-avoid">
                    {row.map((cell, c) => (
                      <td key={c} className="border border-line px-2 py-1 align-top tabular-nums">
                        <MathText text={cell} />
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
        </section>
      ))}
      {previews.length ? (
        <section className="mt-6" aria-labelledby="report-previews">
          <h2 id="report-previews" className="border-b border-line pb-1 text-lg font-extrabold">
            Previews
          </h2>
          <div className="mt-2 grid grid-cols-3 gap-3">
            {previews.map((p) => {
              const picture = <img src={apiUrl(`/projects/${projectId}/runs/${runId}/artifacts/${p.name}`)} alt={p.label} className="w-full ring-1 ring-line [image-rendering:pixelated]" />;
              return (
                <figure key={p.name} className="break-inside-avoid">
                  {/* README "Picture convention": labelled axes, x (u) to the right, y (v) up. */}
                  {p.frame ? (
                    <PictureAxes spec={p.frame} mirrored={false} visible={FULL_VIEW}>
                      {picture}
                    </PictureAxes>
                  ) : (
                    picture
                  )}
                  <figcaption className="mt-1 text-xs text-ink-soft">{p.label}</figcaption>
                </figure>
              );
            })}
          </div>
        </section>
      ) : null}
    </article>
  );
}
