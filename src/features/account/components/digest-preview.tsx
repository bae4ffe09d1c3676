import { Link } from "react-router-dom";
import type { Digest } from "@shared/schemas/digest";

/** This week's digest as the mail would read now: its sections, each with its lines and links. */
export function DigestPreview({ digest }: { digest: Digest }) {
  if (digest.sections.length === 0)
    return <p className="text-sm text-muted">Your roles get no digest sections yet: the digest goes to group analysts, service directors and shop managers.</p>;
  return (
    <article aria-label="Digest preview" className="space-y-4">
      <p className="text-sm"><span className="font-semibold">Subject:</span> {digest.subject}</p>
      {digest.sections.map((s) => (
        <section key={s.key} aria-labelledby={`digest-${s.key}`}>
          <h3 id={`digest-${s.key}`} className="text-sm font-semibold">{s.title}</h3>
          <ul className="mt-1 list-disc space-y-1 pl-5 text-sm">
            {s.lines.map((l, i) => (
              <li key={i}>{l}</li>
            ))}
          </ul>
          {s.links.length > 0 && (
            <p className="mt-1 flex flex-wrap gap-x-4 text-sm">
              {s.links.map((l) => (
                <Link key={l.url} to={l.url} className="text-accent underline">{l.label}</Link>
              ))}
            </p>
          )}
        </section>
      ))}
    </article>
  );
}
