/**
 * Server sync for the Now screen with @tanstack/react-query. The screen never waits on these:
 * it computes from whatever model and state it is handed (server-rendered first, then the
 * cache; the offline store can hand the same shapes).
 *
 * Optimistic updates: the cache holds the server's state; pending changes are laid over it
 * for display, and dropped when the server answers (refused → rolled back with a message).
 */
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, useMemo, useRef, useState } from "react";
import type { RigModel } from "~/engine/model";
import {
  applyChange,
  type LatestReading,
  type RigState,
  type StateChange,
  type StateWriteResult,
} from "~/schemas/rig-state";
import type { Role } from "~/auth/roles";

export type { Role };

export interface RigModelPayload {
  rigId: string;
  name: string;
  revision: number;
  model: RigModel;
  role: Role;
}

export interface RigStatePayload {
  state: RigState;
  latestReading: LatestReading | null;
  role: Role;
}

/** How often a phone asks for changes made by others (a guest sees them within this). */
export const STATE_REFETCH_MS = 10_000;

export const rigKeys = {
  model: (rigId: string) => ["rig", rigId, "model"] as const,
  state: (rigId: string) => ["rig", rigId, "state"] as const,
};

export class ApiRefusal extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) throw await refusal(res);
  return (await res.json()) as T;
}

async function postJson<T>(url: string, body: unknown): Promise<T> {
  const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json", accept: "application/json" }, body: JSON.stringify(body) });
  if (!res.ok) throw await refusal(res);
  return (await res.json()) as T;
}

async function refusal(res: Response): Promise<ApiRefusal> {
  let code = "http_error";
  let message = `The server answered ${res.status}.`;
  try {
    const body = (await res.json()) as { error?: { code?: string; message?: string } };
    code = body.error?.code ?? code;
    message = body.error?.message ?? message;
  } catch {
    /* not JSON */
  }
  return new ApiRefusal(res.status, code, message);
}

export function useRigModel(rigId: string, initial: RigModelPayload) {
  return useQuery({
    queryKey: rigKeys.model(rigId),
    queryFn: () => getJson<RigModelPayload>(`/api/rigs/${rigId}/model`),
    initialData: initial,
    staleTime: 60_000,
    refetchInterval: 120_000,
  });
}

export type SyncStatus = "idle" | "saving" | "offline" | "error";

export interface Notice {
  id: number;
  tone: "info" | "warn" | "error";
  text: string;
}

const fieldLabel = (field: string, model: RigModel): string => {
  if (field.startsWith("load:")) return model.loads.find((l) => `load:${l.id}` === field)?.name ?? field.slice(5);
  if (field.startsWith("switch:")) return model.switches.find((s) => `switch:${s.id}` === field)?.name ?? field.slice(7);
  return { mode: "the mode", soc: "the SoC", place: "the place", weather: "the weather" }[field] ?? field;
};

/**
 * The shared state with background refetch, and `change()` to write one change optimistically.
 */
export function useRigState(rigId: string, initial: RigStatePayload, model: RigModel) {
  const client = useQueryClient();
  const query = useQuery({
    queryKey: rigKeys.state(rigId),
    queryFn: () => getJson<RigStatePayload>(`/api/rigs/${rigId}/state`),
    initialData: initial,
    refetchInterval: STATE_REFETCH_MS,
    refetchOnWindowFocus: true,
  });
  const [pending, setPending] = useState<Array<{ id: number; change: StateChange }>>([]);
  const [notices, setNotices] = useState<Notice[]>([]);
  const seq = useRef(0);
  const notify = useCallback((tone: Notice["tone"], text: string) => {
    const id = ++seq.current;
    setNotices((n) => [...n.slice(-2), { id, tone, text }]);
    setTimeout(() => setNotices((n) => n.filter((x) => x.id !== id)), 8000);
  }, []);

  const mutation = useMutation({
    mutationFn: (v: { id: number; change: StateChange; baseVersion: number }) =>
      postJson<StateWriteResult>(`/api/rigs/${rigId}/state`, { baseVersion: v.baseVersion, clientTime: new Date().toISOString(), change: v.change }),
    onSuccess: (result) => {
      client.setQueryData<RigStatePayload>(rigKeys.state(rigId), (old) =>
        old && old.state.version > result.state.version
          ? old
          : // A write's answer has no switch history: keep the last one until the next refetch.
            { ...(old ?? initial), state: result.state.history || !(old ?? initial).state.history ? result.state : { ...result.state, history: (old ?? initial).state.history } },
      );
      for (const lost of result.lostFields) {
        notify("warn", `${lost.byName ?? "Someone"} changed ${fieldLabel(lost.field, model)} just after you; their change stands.`);
      }
      for (const r of result.replaced) {
        notify("info", `You replaced ${r.byName ?? "someone"}'s change to ${fieldLabel(r.field, model)}.`);
      }
    },
    onError: (error) => {
      const text =
        error instanceof ApiRefusal
          ? error.message
          : "The change could not be sent (no connection?). It was undone here; try again when online.";
      notify("error", text);
    },
    onSettled: (_d, _e, v) => {
      setPending((p) => p.filter((x) => x.id !== v.id));
    },
  });

  const change = useCallback(
    (c: StateChange) => {
      const id = ++seq.current;
      setPending((p) => [...p, { id, change: c }]);
      const base = client.getQueryData<RigStatePayload>(rigKeys.state(rigId))?.state.version ?? 0;
      if (typeof navigator !== "undefined" && !navigator.onLine) {
        // No connection: saved on the phone and sent by the sync runner (app/offline).
        client.setQueryData<RigStatePayload>(rigKeys.state(rigId), (old) => (old ? { ...old, state: applyChange(old.state, c) } : old));
        setPending((p) => p.filter((x) => x.id !== id));
        void import("~/offline/now.client").then(({ queueStateWrite }) =>
          queueStateWrite(rigId, { baseVersion: base, clientTime: new Date().toISOString(), change: c }),
        );
        notify("info", "Saved on this phone; it is sent when the connection returns.");
        return;
      }
      mutation.mutate({ id, change: c, baseVersion: base });
    },
    [client, mutation, notify, rigId],
  );

  const server = query.data ?? initial;
  const state = useMemo(() => pending.reduce((s, p) => applyChange(s, p.change), server.state), [pending, server.state]);
  const status: SyncStatus = pending.length ? "saving" : query.isError ? (typeof navigator !== "undefined" && !navigator.onLine ? "offline" : "error") : "idle";
  return {
    state,
    latestReading: server.latestReading,
    role: server.role,
    status,
    notices,
    notify,
    change,
    lastFetchedMs: query.dataUpdatedAt,
    refetch: query.refetch,
  };
}

/** Owner edits to modes (new revisions of the model). */
export function useModeEdit(rigId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: async (body: unknown) => {
      const current = client.getQueryData<RigModelPayload>(rigKeys.model(rigId));
      if (current && typeof navigator !== "undefined" && !navigator.onLine) {
        // No connection: saved on the phone and sent by the sync runner (app/offline).
        const { queueModeEdit } = await import("~/offline/now.client");
        return queueModeEdit(current, body);
      }
      return postJson<{ revision: number; modeId: string; model: RigModel }>(`/api/rigs/${rigId}/modes`, body);
    },
    onSuccess: (result) => {
      client.setQueryData<RigModelPayload>(rigKeys.model(rigId), (old) => (old ? { ...old, revision: result.revision, model: result.model } : old));
    },
    onError: () => {
      void client.invalidateQueries({ queryKey: rigKeys.model(rigId) });
    },
  });
}
