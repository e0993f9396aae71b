import { WordmarkGlyph } from '../components/ui/wordmark';

/** Shown for the moment before the session is known, on the very first load. */
export function StartingUp() {
  return (
    <div className="mx-auto flex min-h-dvh w-full max-w-6xl flex-col gap-8 px-4 py-6 sm:px-6 lg:px-8">
      <header>
        <p className="inline-flex items-center gap-3 text-2xl font-bold tracking-tight">
          <WordmarkGlyph />
          Cartouche
        </p>
      </header>
      <main id="main" tabIndex={-1}>
        <p role="status" className="text-lg text-muted">
          Opening Cartouche…
        </p>
      </main>
    </div>
  );
}
