/**
 * The sync runner. One sync runs at a time; it starts on app start, on the browser's `online`
 * event, when the app becomes visible, shortly after a local change (debounced) and
 * periodically. A failed sync waits with exponential backoff (with jitter) before the next try.
 *
 * Per rig, a sync sends the outbox oldest first in batches, records the server's answer for
 * each change, applies the changes others made since the rig's cursor, then moves the cursor.
 * Nothing leaves the outbox before the server has answered for it: a crash between send and
 * acknowledge only means the batch is sent again, and the server answers `duplicate`.
 *
 * States: idle, syncing, offline, error. An expired session is an error with code "auth":
 * the outbox is kept and the person is asked to sign in again.
 */
import { acknowledge, countOutbox, nextBatch, onLocalChange } from "./outbox.client";
import { getMeta, localDb, setMeta, windowDays, type LocalReading, type TilldawnDb } from "./db.client";
import { syncResponseSchema, type PulledChange, type SyncResponse, type WireReading } from "~/schemas/sync";
import { compactReadings, prunePackedDays, unpackReadings } from "./readings-store.client";

export type SyncState = "idle" | "syncing" | "offline" | "error";
export type SyncErrorCode = "auth" | "network" | "server" | "refused_request";

export type SyncStatus = {
  state: SyncState;
  /** Changes saved on the phone that the server has not acknowledged. */
  waiting: number;
  /** Changes the server refused (kept to show the person why). */
  refused: number;
  lastSyncedAt: number | null;
  error: { code: SyncErrorCode; message: string } | null;
  /** When the next automatic try is due after a failure. */
  retryAt: number | null;
  /** Switch changes that lost to a later change by someone else (last writer wins). */
  notices: string[];
};

export class SyncError extends Error {
  constructor(
    readonly code: SyncErrorCode,
    message: string,
  ) {
    super(message);
    this.name = "SyncError";
  }
}

export type RunnerOptions = {
  db: TilldawnDb;
  fetch?: typeof fetch;
  isOnline?: () => boolean;
  now?: () => number;
  random?: () => number;
  setTimeout?: (fn: () => void, ms: number) => unknown;
  clearTimeout?: (handle: unknown) => void;
  /** Changes per request. */
  batchSize?: number;
  debounceMs?: number;
  periodMs?: number;
  backoffBaseMs?: number;
  backoffMaxMs?: number;
  /** Called after a pull says a rig's shared state or model moved (the app reads it again). */
  onRemoteChange?: (rigId: string, what: "state" | "model") => void;
  /** Origin for the API (tests); the page's own by default. */
  baseUrl?: string;
};

const DAY_MS = 86_400_000;

export class SyncRunner {
  private readonly o: Required<Omit<RunnerOptions, "onRemoteChange" | "baseUrl">> & Pick<RunnerOptions, "onRemoteChange" | "baseUrl">;
  private status: SyncStatus = { state: "idle", waiting: 0, refused: 0, lastSyncedAt: null, error: null, retryAt: null, notices: [] };
  private listeners = new Set<(s: SyncStatus) => void>();
  private running: Promise<void> | null = null;
  private again = false;
  private failures = 0;
  private debounceTimer: unknown = null;
  private retryTimer: unknown = null;
  private periodTimer: unknown = null;
  private detach: Array<() => void> = [];

  constructor(options: RunnerOptions) {
    this.o = {
      fetch: (...args) => fetch(...args),
      isOnline: () => (typeof navigator === "undefined" ? true : navigator.onLine),
      now: () => Date.now(),
      random: Math.random,
      setTimeout: (fn, ms) => setTimeout(fn, ms),
      clearTimeout: (h) => clearTimeout(h as ReturnType<typeof setTimeout>),
      batchSize: 1000,
      debounceMs: 800,
      periodMs: 60_000,
      backoffBaseMs: 2_000,
      backoffMaxMs: 5 * 60_000,
      ...options,
    };
  }

  getStatus(): SyncStatus {
    return this.status;
  }

  subscribe(fn: (s: SyncStatus) => void): () => void {
    this.listeners.add(fn);
    fn(this.status);
    return () => this.listeners.delete(fn);
  }

  private set(patch: Partial<SyncStatus>) {
    this.status = { ...this.status, ...patch };
    for (const fn of this.listeners) fn(this.status);
  }

  async refreshCounts() {
    const counts = await countOutbox(this.o.db);
    this.set(counts);
  }

  /** Starts the triggers (browser only). */
  start() {
    void this.refreshCounts();
    void this.syncNow("start");
    if (typeof window !== "undefined") {
      const online = () => void this.syncNow("online");
      const offline = () => this.set({ state: "offline" });
      const visible = () => {
        if (document.visibilityState === "visible") this.request("visible");
      };
      window.addEventListener("online", online);
      window.addEventListener("offline", offline);
      document.addEventListener("visibilitychange", visible);
      this.detach.push(
        () => window.removeEventListener("online", online),
        () => window.removeEventListener("offline", offline),
        () => document.removeEventListener("visibilitychange", visible),
      );
    }
    const unsub = onLocalChange(() => {
      void this.refreshCounts();
      this.request("change");
    });
    this.detach.push(() => void unsub());
    const tick = () => {
      this.periodTimer = this.o.setTimeout(tick, this.o.periodMs);
      this.request("periodic");
    };
    this.periodTimer = this.o.setTimeout(tick, this.o.periodMs);
  }

  stop() {
    for (const fn of this.detach.splice(0)) fn();
    for (const t of [this.debounceTimer, this.retryTimer, this.periodTimer]) if (t) this.o.clearTimeout(t);
  }

  /** Asks for a sync soon (debounced). During a backoff wait, the wait is kept. */
  request(_reason: "change" | "visible" | "periodic") {
    if (this.status.retryAt && this.status.retryAt > this.o.now()) return;
    if (this.debounceTimer) this.o.clearTimeout(this.debounceTimer);
    this.debounceTimer = this.o.setTimeout(() => {
      this.debounceTimer = null;
      void this.syncNow("debounced");
    }, this.o.debounceMs);
  }

  /**
   * Runs a sync now, or, when one is running, once more right after it. Resolves when the
   * sync that covers this call has finished (it never rejects: the outcome is in the status).
   */
  syncNow(_reason = "manual"): Promise<void> {
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = (async () => {
      try {
        do {
          this.again = false;
          await this.runOnce();
        } while (this.again);
      } finally {
        this.running = null;
      }
    })();
    return this.running;
  }

  private async runOnce() {
    if (this.retryTimer) {
      this.o.clearTimeout(this.retryTimer);
      this.retryTimer = null;
    }
    if (!this.o.isOnline()) {
      await this.refreshCounts();
      this.set({ state: "offline", retryAt: null });
      return;
    }
    this.set({ state: "syncing", error: null, retryAt: null });
    try {
      const rigIds = await this.rigsToSync();
      for (const rigId of rigIds) await this.syncRig(rigId);
      this.failures = 0;
      await this.refreshCounts();
      this.set({ state: "idle", lastSyncedAt: this.o.now(), error: null });
    } catch (error) {
      await this.refreshCounts();
      const e = error instanceof SyncError ? error : new SyncError("network", "Tilldawn could not reach the server.");
      if (e.code === "network" && !this.o.isOnline()) {
        this.set({ state: "offline" });
        return;
      }
      this.failures++;
      if (e.code === "auth") {
        // No retry loop: the person must sign in; the outbox waits.
        this.set({ state: "error", error: { code: e.code, message: e.message }, retryAt: null });
        return;
      }
      const delay = backoffDelay(this.failures, this.o.backoffBaseMs, this.o.backoffMaxMs, this.o.random());
      const retryAt = this.o.now() + delay;
      this.set({ state: "error", error: { code: e.code, message: e.message }, retryAt });
      this.retryTimer = this.o.setTimeout(() => {
        this.retryTimer = null;
        void this.syncNow("retry");
      }, delay);
    }
  }

  private async rigsToSync(): Promise<string[]> {
    const db = this.o.db;
    const ids = new Set<string>((await db.rigs.toCollection().primaryKeys()) as string[]);
    await db.outbox.where("state").equals("waiting").each((e) => ids.add(e.rigId));
    return [...ids];
  }

  private async syncRig(rigId: string) {
    const db = this.o.db;
    const days = await windowDays(db);
    const since = new Date(this.o.now() - days * DAY_MS).toISOString();
    for (;;) {
      const batch = await nextBatch(db, rigId, this.o.batchSize);
      const cursor = await getMeta<number | null>(db, `cursor:${rigId}`, null);
      const answer = await this.post({
        rigId,
        cursor,
        since,
        changes: batch.map((e) => ({ id: e.id, kind: e.kind, rigId: e.rigId, clientTime: e.clientTime, payload: e.payload })),
      });
      await acknowledge(db, batch, answer.results);
      for (const r of answer.results) {
        if (r.status === "applied" && r.detail?.superseded) {
          this.set({ notices: [...this.status.notices, "A switch change of yours was overtaken by a later change from someone else."].slice(-5) });
        }
      }
      await this.applyPulled(rigId, answer.changes);
      await setMeta(db, `cursor:${rigId}`, answer.cursor);
      if (answer.me) {
        const rig = await db.rigs.get(rigId);
        if (rig) await db.rigs.update(rigId, { role: answer.me.role, userId: answer.me.userId });
        await setMeta(db, "userId", answer.me.userId);
      }
      await this.refreshCounts();
      if (batch.length < this.o.batchSize && !answer.more) break;
    }
    await pruneReadings(db, rigId, this.o.now() - days * DAY_MS);
    await prunePackedDays(db, rigId, this.o.now() - days * DAY_MS);
    await compactReadings(db, rigId, this.o.now());
  }

  private async post(body: unknown): Promise<SyncResponse> {
    let response: Response;
    try {
      response = await this.o.fetch(`${this.o.baseUrl ?? ""}/api/sync`, {
        method: "POST",
        headers: { "content-type": "application/json", accept: "application/json" },
        credentials: "same-origin",
        body: JSON.stringify(body),
      });
    } catch {
      throw new SyncError("network", "Tilldawn could not reach the server.");
    }
    if (response.status === 401) throw new SyncError("auth", "Your session has ended. Sign in again to sync; your changes are kept on this phone.");
    if (response.status === 404 || response.status === 403) {
      throw new SyncError("refused_request", "This rig is no longer shared with you, so its changes cannot be sent.");
    }
    if (response.status >= 400 && response.status < 500) {
      const detail = (await response.json().catch(() => null)) as { error?: { message?: string } } | null;
      throw new SyncError("refused_request", detail?.error?.message ?? `The server refused the sync (${response.status}).`);
    }
    if (!response.ok) throw new SyncError("server", `The server had a problem (${response.status}). Tilldawn will try again.`);
    let answer: unknown;
    try {
      answer = await response.json();
    } catch {
      throw new SyncError("server", "The server's answer was cut off. Tilldawn will try again.");
    }
    const parsed = syncResponseSchema.safeParse(answer);
    if (!parsed.success) throw new SyncError("server", "The server's answer was not understood. Tilldawn will try again.");
    return parsed.data;
  }

  private async applyPulled(rigId: string, changes: PulledChange[]) {
    const db = this.o.db;
    const readings = changes.flatMap((c) => (c.kind === "reading" ? [c.reading] : []));
    if (readings.length) {
      await db.transaction("rw", db.readings, db.readingDays, db.outbox, async () => {
        // A reading with a change of ours still waiting keeps our version until that change is answered.
        const pending = new Set((await db.outbox.where("entityId").anyOf(readings.map((r) => r.id)).filter((e) => e.state === "waiting").toArray()).map((e) => e.entityId));
        const put: LocalReading[] = [];
        const gone: string[] = [];
        for (const r of readings) {
          if (pending.has(r.id)) continue;
          if (r.deletedAt) gone.push(r.id);
          else put.push(fromWire(r));
        }
        await db.readings.bulkPut(put);
        await db.readings.bulkDelete(gone);
        // Packed copies of changed or deleted readings are dropped (a changed one lives in `readings` until packed again).
        await unpackReadings(db, rigId, [...put.map((r) => r.id), ...gone]);
      });
    }
    for (const c of changes) if (c.kind !== "reading") this.o.onRemoteChange?.(rigId, c.kind);
  }
}

export function fromWire(r: WireReading): LocalReading {
  return {
    id: r.id,
    rigId: r.rigId,
    authorId: r.authorId,
    takenAt: Date.parse(r.takenAt),
    bankVoltageV: r.bankVoltageV,
    currentA: r.currentA,
    socPct: r.socPct,
    temperatureC: r.temperatureC,
    solarWhToday: r.solarWhToday,
    note: r.note,
    source: r.source,
    updatedAt: Date.parse(r.updatedAt),
    sync: "synced",
  };
}

/** Exponential backoff with jitter: base × 2^(n−1), capped, times a factor in [0.5, 1). */
export function backoffDelay(failures: number, baseMs: number, maxMs: number, random: number): number {
  const exp = Math.min(maxMs, baseMs * 2 ** Math.max(0, failures - 1));
  return Math.round(exp * (0.5 + random / 2));
}

/** Drops synced readings older than the window (pending ones always stay). */
export async function pruneReadings(db: TilldawnDb, rigId: string, olderThan: number) {
  await db.readings
    .where("[rigId+takenAt]")
    .between([rigId, -Infinity], [rigId, olderThan], true, false)
    .filter((r) => r.sync === "synced")
    .delete();
}

let runner: SyncRunner | undefined;

/** The app's one runner (browser only). */
export function syncRunner(): SyncRunner {
  runner ??= new SyncRunner({
    db: localDb(),
    onRemoteChange: (rigId, what) => window.dispatchEvent(new CustomEvent("tilldawn:remote-change", { detail: { rigId, what } })),
  });
  return runner;
}
