/** Shared by the upload form and the server. */
export const PHOTO_MAX_BYTES = 15 * 1024 * 1024;
export const PHOTO_TYPES = ["image/jpeg", "image/png", "image/webp"] as const;
export type PhotoMime = (typeof PHOTO_TYPES)[number];
/** What the file picker offers (HEIC is offered so the server can say why it refuses it). */
export const PHOTO_ACCEPT = "image/jpeg,image/png,image/webp,image/heic,image/heif,.jpg,.jpeg,.png,.webp,.heic,.heif";
export const THUMB_MAX_PX = 480;
export const PLACE_MAX = 80;
export const CAPTION_MAX = 200;
