/** Shared by server and browser. */
/** What the pages and the API show of a photo (no object keys). */
export type PhotoView = {
  id: string;
  partId: string | null;
  partKind: string | null;
  place: string;
  readingId: string | null;
  caption: string;
  mime: string;
  bytes: number;
  width: number;
  height: number;
  keptLocation: boolean;
  authorId: string | null;
  authorName: string | null;
  createdAt: string;
  /** Where the browser loads the picture (through the server, which checks membership). */
  thumbUrl: string;
  url: string;
};
