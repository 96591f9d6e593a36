/**
 * Photos of one logbook reading (e.g. the monitor's screen or a hydrometer), for the reading's
 * page. The list comes from the server, so it needs a connection; a reading saved on the phone
 * takes photos once it has synced.
 */
import { PhotoStrip } from "./photo-strip";

export function ReadingPhotos({ rigId, readingId }: { rigId: string; readingId: string }) {
  return (
    <div className="rounded-2xl border border-night-700 bg-night-900 p-4">
      <PhotoStrip rigId={rigId} target={{ readingId }} title="Photos of this reading" headingLevel={2} emptyText="No photos of this reading." />
    </div>
  );
}
