import { isRouteErrorResponse, Link, useRouteError } from 'react-router';
import { problemOf, problemReference, type ProblemDetails } from '../api/http';
import { Button } from '../components/ui/button';
import { ProblemNotice } from '../components/ui/problem-notice';
import { WordmarkGlyph } from '../components/ui/wordmark';

function routeProblem(error: unknown): ProblemDetails {
  if (isRouteErrorResponse(error)) {
    const data: unknown = error.data;
    return {
      type: 'about:blank',
      title: error.statusText || `Error ${error.status}`,
      status: error.status,
      detail: typeof data === 'string' ? data : 'This page could not be shown.',
    };
  }
  return problemOf(error);
}

function ErrorBody() {
  const problem = routeProblem(useRouteError());
  return (
    <>
      <title>{`${problem.title} · Cartouche`}</title>
      <ProblemNotice
        announce
        headingLevel={1}
        title={problem.title}
        detail={problem.detail}
        items={problem.errors?.map((entry) => entry.detail)}
        reference={problemReference(problem)}
        className="max-w-3xl"
        action={
          <>
            <Button variant="primary" onClick={() => window.location.reload()}>
              Reload the page
            </Button>
            <Link
              to="/"
              reloadDocument
              className="inline-flex min-h-11 items-center rounded-control font-bold"
            >
              Go to the overview
            </Link>
          </>
        }
      />
    </>
  );
}

/** Shown inside the page chrome when a screen fails. */
export function RouteErrorPanel() {
  return <ErrorBody />;
}

/** Shown on its own when the page chrome itself fails. */
export function RootErrorPage() {
  return (
    <div className="mx-auto flex min-h-dvh w-full max-w-6xl flex-col gap-8 px-4 py-6 sm:px-6 lg:px-8">
      <header>
        <p className="inline-flex items-center gap-3 text-2xl font-bold tracking-tight">
          <WordmarkGlyph />
          Cartouche
        </p>
      </header>
      <main id="main" tabIndex={-1}>
        <ErrorBody />
      </main>
    </div>
  );
}
