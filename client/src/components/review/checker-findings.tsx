import type { Finding } from '../../../../common/alt-text/index.ts';
import { ErrorGlyph } from '../ui/field';

/** The checker's findings as the editor types: errors block approval, warnings only advise; each cites its source. */
export function CheckerFindings({ findings, id }: { findings: readonly Finding[]; id: string }) {
  if (findings.length === 0) {
    return (
      <p id={id} className="text-sm text-muted">
        The checker finds nothing to change.
      </p>
    );
  }
  return (
    <ul id={id} className="space-y-2" aria-label="Checker findings">
      {findings.map((f) => (
        <li key={f.ruleId} className={f.severity === 'error' ? 'rounded-control border-2 border-ink border-l-[6px] bg-raised p-2' : 'rounded-control border-2 border-dashed border-line bg-raised p-2'}>
          <p className="flex items-start gap-1.5">
            {f.severity === 'error' ? <ErrorGlyph /> : <WarningGlyph />}
            <span>
              <span className="font-bold">{f.severity === 'error' ? 'Blocks approval: ' : 'Advice: '}</span>
              {f.message}
            </span>
          </p>
          <p className="mt-1 pl-5 text-sm text-muted">
            Source:{' '}
            {f.sources.map((s, i) => (
              <span key={s.label}>
                {i > 0 ? '; ' : ''}
                {s.url ? (
                  <a href={s.url} target="_blank" rel="noreferrer">
                    {s.label}
                  </a>
                ) : (
                  s.label
                )}
              </span>
            ))}
          </p>
        </li>
      ))}
    </ul>
  );
}

function WarningGlyph() {
  return (
    <svg viewBox="0 0 16 16" width="16" height="16" aria-hidden="true" focusable="false" className="mt-1 shrink-0">
      <path d="M8 1.5l6.5 12h-13z" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
      <path d="M8 6v3.5M8 11.5v.5" stroke="currentColor" strokeWidth="1.75" strokeLinecap="round" />
    </svg>
  );
}
