import { useHealth } from '../../api/health';
import { problemOf } from '../../api/http';
import { Button } from '../ui/button';
import { StatusBadge } from '../ui/status-badge';
import { describeHealth } from './describe-health';

/** One line on the state of the database, the night-shift worker and the image-feature runtime, refreshed every half minute. */
export function SystemStatusLine() {
  const health = useHealth();

  return (
    <section
      aria-labelledby="system-status-heading"
      className="rounded-card border border-rule bg-raised px-4 py-4 sm:px-5"
    >
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h2 id="system-status-heading" className="text-base font-bold">
          System status
          {health.data ? (
            <span className="font-normal text-muted">: {describeHealth(health.data).summary}</span>
          ) : null}
        </h2>
        {health.data ? <p className="text-sm text-muted">Cartouche version {health.data.version}</p> : null}
      </div>
      <div className="mt-3">
        <HealthBody health={health} />
      </div>
    </section>
  );
}

function HealthBody({ health }: { health: ReturnType<typeof useHealth> }) {
  if (health.isPending) {
    return (
      <p role="status" className="text-muted">
        Checking the database and the night shift…
      </p>
    );
  }

  if (health.data === undefined) {
    const problem = problemOf(health.error);
    return (
      <div className="flex flex-col items-start gap-3 sm:flex-row sm:items-center sm:justify-between sm:gap-4">
        <p>
          <StatusBadge tone="unknown">Status unknown</StatusBadge>{' '}
          <span className="font-bold">{problem.title}.</span> {problem.detail}
        </p>
        <Button onClick={() => void health.refetch()} disabled={health.isFetching} className="shrink-0">
          {health.isFetching ? 'Checking…' : 'Retry'}
        </Button>
      </div>
    );
  }

  const { parts } = describeHealth(health.data);
  return (
    <div className="flex flex-col gap-2">
      <ul className="flex flex-col gap-x-8 gap-y-2 md:flex-row md:flex-wrap md:items-center">
        {parts.map((part) => (
          <li key={part.key} className="flex min-w-0 max-w-full flex-wrap items-center gap-x-2 gap-y-1">
            <StatusBadge tone={part.tone}>{part.state}</StatusBadge>
            <span className="min-w-0 text-sm text-muted wrap-anywhere">{part.detail}</span>
          </li>
        ))}
      </ul>
      {health.isError ? (
        <p className="text-sm">
          <span className="font-bold">The latest check failed:</span> {problemOf(health.error).title}. Showing the
          previous report.
        </p>
      ) : null}
    </div>
  );
}
