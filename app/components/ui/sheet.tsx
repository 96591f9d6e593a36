import { useEffect, useId, useRef, type ReactNode } from "react";

/**
 * A bottom sheet on phones, a centred dialog on wide screens: the native <dialog> element
 * (focus trap, Escape to close, the page behind inert).
 */
export function Sheet({ open, onClose, title, children }: { open: boolean; onClose: () => void; title: string; children: ReactNode }) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      onClose={onClose}
      onClick={(e) => {
        if (e.target === ref.current) onClose();
      }}
      className="m-0 mt-auto w-full max-w-none rounded-t-3xl border border-night-600 bg-night-900 p-0 text-night-100 backdrop:bg-night-950/80 md:m-auto md:max-w-lg md:rounded-3xl"
    >
      {open ? (
        <div className="max-h-[80dvh] overflow-y-auto p-5">
          <div className="mb-3 flex items-start justify-between gap-3">
            <h2 id={titleId} className="text-xl font-bold">
              {title}
            </h2>
            <button type="button" onClick={onClose} className="min-h-12 min-w-12 rounded-xl bg-night-800 font-bold" aria-label="Close">
              ✕
            </button>
          </div>
          {children}
        </div>
      ) : null}
    </dialog>
  );
}
