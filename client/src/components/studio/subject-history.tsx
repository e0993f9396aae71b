import { problemOf } from '../../api/http';
import { useSubjectHistory } from '../../api/subjects';
import { formatDateTime } from '../../lib/format';
import { ProblemNotice } from '../ui/problem-notice';

/** The subject's changes in the studio — record, place in the tree, examples, model versions — newest first. */
export function SubjectHistory({ subjectId }: { subjectId: number }) {
  const history = useSubjectHistory(subjectId);
  if (history.isError) {
    const p = problemOf(history.error);
    return <ProblemNotice title={p.title} detail={p.detail} />;
  }
  if (!history.data) return <p role="status">Loading the history…</p>;
  if (history.data.length === 0) return <p className="text-muted">No change to this subject has been recorded yet.</p>;
  return (
    <ol className="space-y-2">
      {history.data.map((h, i) => (
        <li key={`${h.at}-${i}`} className="border-l-4 border-line pl-3">
          <p>
            <span className="font-bold">{h.actor?.name ?? 'Cartouche'}</span> {h.summary}
          </p>
          <p className="text-sm text-muted">
            <time dateTime={h.at}>{formatDateTime(h.at)}</time>
          </p>
        </li>
      ))}
    </ol>
  );
}
