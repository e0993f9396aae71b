import { useId } from 'react';
import { useCollections } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { useIntakeSettings } from '../api/intake';
import { ScanDropZone } from '../components/intake/scan-drop-zone';
import { SheetImport } from '../components/intake/sheet-import';
import { UploadList } from '../components/intake/upload-list';
import { useUploadQueue } from '../components/intake/use-upload-queue';
import { orList } from '../components/intake/words';
import { CollectionPicker, useCollectionParam } from '../components/collections/collection-picker';
import { Card } from '../components/ui/card';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatBytes, formatCount } from '../lib/format';

/** Archivists: bring scans into a collection, and their catalogue records from a spreadsheet. */
export function IntakeRoute() {
  const collections = useCollections();
  const settings = useIntakeSettings();
  const { queue, entries, totals, announcement } = useUploadQueue(settings.data?.maxFileBytes);
  const scansHeading = useId();
  const sheetHeading = useId();

  const list = collections.data?.collections ?? [];
  const { chosen, choose } = useCollectionParam(list);

  const hint = settings.data
    ? `${orList(settings.data.formats.map((f) => f.label))}, up to ${formatBytes(settings.data.maxFileBytes)} each and ${formatCount(
        Math.round(settings.data.maxPixels / 1_000_000),
      )} megapixels. Cartouche reads each file to tell its format, so a wrong extension does no harm; every file gets its own answer.`
    : 'JPEG, PNG, TIFF or WebP. Every file gets its own answer.';

  return (
    <>
      <title>Intake · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Intake</h1>
          <p className="max-w-prose text-lg text-muted">
            Bring scans into a collection, then match them to their catalogue records from a spreadsheet.
          </p>
        </div>

        {collections.isError && list.length === 0 ? (
          <ProblemNotice
            announce
            headingLevel={2}
            title={problemOf(collections.error).title}
            detail={problemOf(collections.error).detail}
            reference={problemReference(problemOf(collections.error))}
          />
        ) : collections.isPending ? (
          <p role="status" className="text-muted">
            Loading collections…
          </p>
        ) : list.length === 0 ? (
          <Card className="max-w-prose">
            <h2 className="text-xl font-bold">No collection to bring scans into</h2>
            <p className="mt-2">Scans and catalogue records always belong to a collection. Once a collection exists, it can be chosen here.</p>
          </Card>
        ) : (
          <>
            <CollectionPicker
              collections={list}
              value={chosen?.id ?? null}
              onChange={choose}
              hint="Scans and catalogue records go into this collection."
            />

            <Card as="section" aria-labelledby={scansHeading} className="space-y-5">
              <div className="space-y-1">
                <h2 id={scansHeading} className="text-2xl font-bold">
                  Scans
                </h2>
                <p className="max-w-prose text-muted">
                  Each scan becomes an item with a thumbnail and a review image. Bytes already in the collection are recognised
                  and not added twice.
                </p>
              </div>
              <ScanDropZone
                hint={hint}
                disabled={chosen === null}
                onFiles={(files) => chosen && queue.add(files, chosen.id, chosen.name)}
              />
              <UploadList entries={entries} totals={totals} announcement={announcement} queue={queue} />
            </Card>

            <Card as="section" aria-labelledby={sheetHeading} className="space-y-5">
              <div className="space-y-1">
                <h2 id={sheetHeading} className="text-2xl font-bold">
                  Catalogue records
                </h2>
                <p className="max-w-prose text-muted">
                  Captions, creators, dates and rights from the catalogue, for items already in {chosen?.name ?? 'the collection'}.
                </p>
              </div>
              <SheetImport key={chosen?.id ?? 0} collectionId={chosen?.id ?? null} settings={settings.data} />
            </Card>
          </>
        )}
      </div>
    </>
  );
}
