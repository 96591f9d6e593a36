/**
 * Moved: the sync protocol lives in app/schemas/sync.ts and the reading's shape in
 * app/schemas/readings.ts (shared by server and phone). This file only re-exports them for
 * older imports; import from ~/schemas/* in new code.
 */
export * from "~/schemas/readings";
export * from "~/schemas/sync";
