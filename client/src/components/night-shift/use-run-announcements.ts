import { useState } from 'react';
import type { Run } from '../../api/runs';
import { stageLabels, statusWords } from './words';

/** What changed between two copies of one run, in one sentence; '' when nothing worth saying did. */
export function runChangeWords(before: Run, after: Run): string {
  const parts: string[] = [];
  if (before.status === 'queued' && after.status === 'running') parts.push(`Run ${after.id} has started.`);
  for (const stage of after.stages) {
    const was = before.stages.find((s) => s.name === stage.name)?.state;
    if ((stage.state === 'done' || stage.state === 'skipped') && was !== stage.state) {
      parts.push(`${stageLabels[stage.name]}: ${stage.state === 'done' ? 'done' : 'skipped'}.`);
    }
  }
  if (before.status !== after.status && after.status !== 'queued' && after.status !== 'running') {
    parts.push(`Run ${after.id} ${statusWords[after.status].toLowerCase()}.`);
  }
  return parts.join(' ');
}

/**
 * What changed in the run on show since it was last seen, for a polite live region: stages that finished,
 * and the run's start and end. Nothing is said about the first copy of a run (that is what the screen shows),
 * nor about progress within a stage, so a long run is not chatty.
 */
export function useRunAnnouncements(run: Run | undefined): string {
  const [seen, setSeen] = useState(run);
  const [message, setMessage] = useState('');
  if (run !== seen) {
    // adjusting state while rendering, when the run changes (no effect, no extra render pass)
    setSeen(run);
    if (run !== undefined && seen !== undefined && seen.id === run.id) {
      const words = runChangeWords(seen, run);
      if (words !== '') setMessage(words);
    }
  }
  return message;
}
