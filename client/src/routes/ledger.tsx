import { useId } from 'react';
import { useCollections } from '../api/collections';
import { useCollectionDashboard, useCoverage } from '../api/dashboard';
import { useLedgerMail } from '../api/exports';
import { problemOf, problemReference } from '../api/http';
import { useSession } from '../api/session';
import { CollectionPicker, useCollectionParam } from '../components/collections/collection-picker';
import { AgreementPanel } from '../components/ledger/agreement-panel';
import { CoverageChart } from '../components/ledger/coverage-chart';
import { ExportPanel } from '../components/ledger/export-panel';
import { MailSettings } from '../components/ledger/mail-settings';
import { PrecisionChart } from '../components/ledger/precision-chart';
import { RecentRuns } from '../components/ledger/recent-runs';
import { ThroughputChart } from '../components/ledger/throughput-chart';
import { Card } from '../components/ui/card';
import { ProblemNotice } from '../components/ui/problem-notice';

function Problem({ error }: { error: unknown }) {
  const p = problemOf(error);
  return <ProblemNotice headingLevel={3} title={p.title} detail={p.detail} reference={problemReference(p)} />;
}

/** The managers' screen: where each collection stands, the files its descriptions leave in, and the weekly mail. */
export function LedgerRoute() {
  const { user } = useSession();
  // the permission is newer than the client's list of names: read it from the session as the server sent it
  const canSchedule = user?.permissions.includes('exports:schedule') ?? false;
  const collections = useCollections();
  const list = collections.data?.collections ?? [];
  const { chosen, choose } = useCollectionParam(list);
  const collectionId = chosen?.id ?? null;
  const coverage = useCoverage();
  const dashboard = useCollectionDashboard(collectionId);
  const mail = useLedgerMail(collectionId);
  const ids = { coverage: useId(), review: useId(), agreement: useId(), runs: useId(), exports: useId(), mail: useId() };

  return (
    <>
      <title>Ledger · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Ledger</h1>
          <p className="max-w-prose text-lg text-muted">
            Where each collection stands, how the review goes, and the files that take the approved descriptions to other systems. Coverage here is a working
            figure — the share of items whose text alternative an editor has approved — not a statement of conformance: accessibility obligations differ by
            jurisdiction, so check them against WCAG 2.2 and the law that applies to you.
          </p>
        </div>

        <Card as="section" aria-labelledby={ids.coverage} className="space-y-4">
          <h2 id={ids.coverage} className="text-2xl font-bold">
            All collections
          </h2>
          {coverage.isError ? <Problem error={coverage.error} /> : coverage.data ? <CoverageChart data={coverage.data} /> : <p className="text-muted">Loading coverage…</p>}
        </Card>

        {collections.isError && list.length === 0 ? (
          <Problem error={collections.error} />
        ) : collections.isPending ? (
          <p role="status" className="text-muted">
            Loading collections…
          </p>
        ) : chosen === null ? (
          <Card className="max-w-prose">
            <h2 className="text-xl font-bold">No collection yet</h2>
            <p className="mt-2">Once a collection exists, its review figures and exports are here.</p>
          </Card>
        ) : (
          <>
            <CollectionPicker collections={list} value={chosen.id} onChange={choose} hint="The review figures, exports and mail below belong to this collection." />

            <Card as="section" aria-labelledby={ids.review} className="space-y-8">
              <div className="space-y-1">
                <h2 id={ids.review} className="text-2xl font-bold">
                  Review of {chosen.name}
                </h2>
                <p className="max-w-prose text-muted">Weeks run Monday to Sunday (UTC) and are named by their Monday.</p>
              </div>
              {dashboard.isError ? (
                <Problem error={dashboard.error} />
              ) : dashboard.data ? (
                <>
                  <ThroughputChart throughput={dashboard.data.throughput} collectionName={chosen.name} />
                  <PrecisionChart subjects={dashboard.data.precision} />
                </>
              ) : (
                <p className="text-muted">Loading the review figures…</p>
              )}
            </Card>

            <Card as="section" aria-labelledby={ids.agreement} className="space-y-4">
              <h2 id={ids.agreement} className="text-2xl font-bold">
                Editor agreement
              </h2>
              {dashboard.data ? <AgreementPanel agreement={dashboard.data.agreement} /> : dashboard.isError ? null : <p className="text-muted">Loading…</p>}
            </Card>

            <Card as="section" aria-labelledby={ids.runs} className="space-y-4">
              <h2 id={ids.runs} className="text-2xl font-bold">
                Last night-shift runs
              </h2>
              {dashboard.data ? <RecentRuns runs={dashboard.data.runs} collectionId={chosen.id} /> : dashboard.isError ? null : <p className="text-muted">Loading…</p>}
            </Card>

            <Card as="section" aria-labelledby={ids.exports} className="space-y-4">
              <div className="space-y-1">
                <h2 id={ids.exports} className="text-2xl font-bold">
                  Exports
                </h2>
                <p className="max-w-prose text-muted">
                  Only approved text leaves Cartouche: a suggestion or a draft is not a description until an editor approves it.
                </p>
              </div>
              <ExportPanel key={chosen.id} collectionId={chosen.id} collectionName={chosen.name} />
            </Card>

            <Card as="section" aria-labelledby={ids.mail} className="space-y-4">
              <h2 id={ids.mail} className="text-2xl font-bold">
                Weekly ledger mail
              </h2>
              {mail.isError ? <Problem error={mail.error} /> : mail.data ? <MailSettings key={chosen.id} collectionId={chosen.id} mail={mail.data} canChange={canSchedule} /> : <p className="text-muted">Loading…</p>}
            </Card>
          </>
        )}
      </div>
    </>
  );
}
