/** Warns before unsaved edits are left behind: the browser's own prompt on unload, and a dialog for links inside the app. */
import { useEffect, useRef } from "react";
import { useBlocker } from "react-router";
import { buttonClass } from "../ui.tsx";

export function LeaveGuard({ dirty }: { dirty: boolean }) {
  const blocker = useBlocker(({ currentLocation, nextLocation }) => dirty && currentLocation.pathname !== nextLocation.pathname);
  const dialog = useRef<HTMLDialogElement>(null);

  useEffect(() => {
    if (!dirty) return;
    const warn = (event: BeforeUnloadEvent) => {
      event.preventDefault();
      event.returnValue = "";
    };
    window.addEventListener("beforeunload", warn);
    return () => window.removeEventListener("beforeunload", warn);
  }, [dirty]);

  useEffect(() => {
    const d = dialog.current;
    if (!d) return;
    if (blocker.state === "blocked" && !d.open) d.showModal();
    if (blocker.state !== "blocked" && d.open) d.close();
  }, [blocker.state]);

  return (
    <dialog
      ref={dialog}
      aria-labelledby="leave-title"
      onCancel={() => blocker.reset?.()}
      className="m-auto max-w-md rounded-lg border border-ink-600 bg-ink-900 p-5 text-ink-100 backdrop:bg-ink-950/70"
    >
      <h2 id="leave-title" className="text-base font-semibold">
        Leave the bench with unsaved edits?
      </h2>
      <p className="mt-2 text-sm text-ink-300">
        Your edits are not saved. They stay in this browser and come back when you open this effect again, but nobody else sees them until
        you save.
      </p>
      <div className="mt-4 flex justify-end gap-2">
        <button type="button" className={buttonClass("secondary")} onClick={() => blocker.reset?.()} autoFocus>
          Stay on the bench
        </button>
        <button type="button" className={buttonClass("danger")} onClick={() => blocker.proceed?.()}>
          Leave anyway
        </button>
      </div>
    </dialog>
  );
}
