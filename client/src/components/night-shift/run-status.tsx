import type { RunStatus, StageState } from '../../api/runs';
import { StatusBadge, type StatusTone } from '../ui/status-badge';
import { stageStateWords, statusWords } from './words';

const statusTones: Record<RunStatus, StatusTone> = {
  queued: 'waiting',
  running: 'attention',
  succeeded: 'done',
  failed: 'down',
  cancelled: 'stopped',
};

const stageTones: Record<StageState, StatusTone> = {
  pending: 'waiting',
  running: 'attention',
  done: 'done',
  skipped: 'passed',
};

export function RunStatusBadge({ status, className }: { status: RunStatus; className?: string }) {
  return (
    <StatusBadge tone={statusTones[status]} className={className}>
      {statusWords[status]}
    </StatusBadge>
  );
}

export function StageStateBadge({ state, className }: { state: StageState; className?: string }) {
  return (
    <StatusBadge tone={stageTones[state]} className={className}>
      {stageStateWords[state]}
    </StatusBadge>
  );
}
