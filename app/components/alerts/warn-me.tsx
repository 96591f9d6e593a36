/**
 * "Warn me": subscribes this browser to the rig's alerts by web push. The notification
 * permission is asked only after the person taps the button; a refusal, a browser without
 * push, or no service worker each get a plain message (e-mail stays available).
 */
import { useEffect, useState } from "react";
import { useRevalidator } from "react-router";
import { Button, Notice } from "~/components/ui/form";

type Status = "checking" | "unsupported" | "off" | "on" | "working" | "denied";

function keyBytes(base64url: string): Uint8Array<ArrayBuffer> {
  const b64 = base64url.replace(/-/g, "+").replace(/_/g, "/").padEnd(Math.ceil(base64url.length / 4) * 4, "=");
  const raw = atob(b64);
  const out = new Uint8Array(new ArrayBuffer(raw.length));
  for (let i = 0; i < raw.length; i++) out[i] = raw.charCodeAt(i);
  return out;
}

async function registration(): Promise<ServiceWorkerRegistration | null> {
  if (!("serviceWorker" in navigator)) return null;
  const ready = navigator.serviceWorker.ready;
  const timeout = new Promise<null>((r) => setTimeout(() => r(null), 8000));
  return Promise.race([ready, timeout]);
}

export function WarnMe({ rigId, publicKey, warned }: { rigId: string; publicKey: string; warned: boolean }) {
  const [status, setStatus] = useState<Status>("checking");
  const [message, setMessage] = useState<{ tone: "error" | "done" | "info"; text: string } | null>(null);
  // After a change the page's loader runs again (the choices appear once "Warn me" is on).
  const { revalidate } = useRevalidator();

  useEffect(() => {
    let cancelled = false;
    (async () => {
      if (!("serviceWorker" in navigator) || !("PushManager" in window) || !("Notification" in window)) return setStatus("unsupported");
      if (Notification.permission === "denied") return setStatus("denied");
      const reg = await navigator.serviceWorker.getRegistration();
      const sub = await reg?.pushManager.getSubscription();
      if (!cancelled) setStatus(sub && warned ? "on" : "off");
    })().catch(() => setStatus("off"));
    return () => {
      cancelled = true;
    };
  }, [warned]);

  async function post(body: unknown) {
    const res = await fetch(`/api/rigs/${rigId}/push`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    if (!res.ok) {
      const answer = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
      throw new Error(answer?.error?.message ?? `The server answered ${res.status}.`);
    }
  }

  async function turnOn() {
    setMessage(null);
    setStatus("working");
    try {
      const permission = await Notification.requestPermission();
      if (permission !== "granted") {
        setStatus(permission === "denied" ? "denied" : "off");
        setMessage({ tone: "info", text: "Notifications were not allowed, so this phone will not be warned. You can still get alerts by e-mail below." });
        return;
      }
      const reg = await registration();
      if (!reg) throw new Error("The app's offline helper is not running in this browser (reload the page once and try again).");
      const sub = (await reg.pushManager.getSubscription()) ?? (await reg.pushManager.subscribe({ userVisibleOnly: true, applicationServerKey: keyBytes(publicKey) }));
      await post({ intent: "subscribe", subscription: sub.toJSON(), timeZone: Intl.DateTimeFormat().resolvedOptions().timeZone });
      setStatus("on");
      setMessage({ tone: "done", text: "This phone will be warned before the cutoff." });
      void revalidate();
    } catch (error) {
      setStatus("off");
      setMessage({ tone: "error", text: `Could not turn on warnings: ${(error as Error).message}` });
    }
  }

  async function turnOff() {
    setMessage(null);
    setStatus("working");
    try {
      const reg = await navigator.serviceWorker.getRegistration();
      const sub = await reg?.pushManager.getSubscription();
      if (sub) {
        await post({ intent: "unsubscribe", endpoint: sub.endpoint });
        await sub.unsubscribe().catch(() => undefined);
      }
      setStatus("off");
      setMessage({ tone: "done", text: "This phone will no longer get push alerts." });
    } catch (error) {
      setStatus("on");
      setMessage({ tone: "error", text: `Could not turn off: ${(error as Error).message}` });
    }
  }

  return (
    <div className="space-y-3" data-warn-me={status}>
      {status === "unsupported" ? (
        <Notice>This browser cannot receive push alerts. Turn on e-mail alerts below instead.</Notice>
      ) : status === "denied" ? (
        <Notice>Notifications are blocked for Tilldawn in this browser's settings. Allow them there, or use e-mail alerts below.</Notice>
      ) : status === "on" ? (
        <div className="flex flex-wrap items-center gap-3">
          <p className="font-bold text-leaf-400">This phone is warned.</p>
          <Button variant="quiet" onClick={turnOff}>Stop warning this phone</Button>
        </div>
      ) : (
        <Button onClick={turnOn} disabled={status === "working" || status === "checking"} aria-describedby="warn-me-hint">
          {status === "working" ? "Turning on…" : "Warn me"}
        </Button>
      )}
      <p id="warn-me-hint" className="text-sm text-night-300">
        A notification on this phone before the bank reaches its cutoff, once per episode, then an all clear. Your browser asks for permission after you tap.
      </p>
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
    </div>
  );
}
