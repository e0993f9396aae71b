import { problemOf } from '../../api/http';
import { useSubjectHistory } from '../../api/subjects';
import { HistoryList } from '../ui/history-list';
import { ProblemNotice } from '../ui/problem-notice';

/** The subject's changes in the studio — record, place in the tree, examples, model versions — newest first. */
export function SubjectHistory({ subjectId }: { subjectId: number }) {
  const history = useSubjectHistory(subjectId);
  if (history.isError) {
    const p = problemOf(history.error);
    return <ProblemNotice title={p.title} detail={p.detail} />;
  }
  if (!history.data) return <p role="status">Loading the history…</p>;
  return <HistoryList entries={history.data} empty="No change to this subject has been recorded yet." />;
}
