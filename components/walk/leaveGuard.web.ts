import { useEffect, useRef } from 'react';

/** Marks the extra history entry this guard pushes (the router reads only its own `id`). */
const TRAP = 'trimoutLeaveGuard';

function onTrap(): boolean {
  const state = window.history.state as Record<string, unknown> | null;
  return Boolean(state && state[TRAP]);
}

function pushTrap() {
  if (onTrap()) return;
  const state = (window.history.state as Record<string, unknown> | null) ?? {};
  window.history.pushState({ ...state, [TRAP]: true }, '', window.location.href);
}

/**
 * While `active`, leaving the page asks first: a reload or a closed tab through the browser's own
 * prompt (beforeunload; browsers show their own words), the browser's Back button through a
 * confirm with `message`.
 *
 * Back is caught with a copy of the current history entry pushed on top (same address, same
 * router state): Back first lands on the original entry, which the router sees as no change, and
 * the page asks. "Stay" puts the copy back; "Leave" goes back once more, for real. (The router
 * handles popstate before any listener added later can stop it, so asking on the event alone
 * would come after the page had already gone.)
 */
export function useLeaveGuard(active: boolean, message: string, _onLeave?: () => void): void {
  const text = useRef(message);
  useEffect(() => {
    text.current = message;
  }, [message]);
  useEffect(() => {
    if (!active || typeof window === 'undefined') return;
    let leaving = false;
    const onBeforeUnload = (e: BeforeUnloadEvent) => {
      e.preventDefault();
      // Older browsers need returnValue set to show the prompt.
      e.returnValue = '';
    };
    const onPopState = () => {
      if (leaving || onTrap()) return;
      if (window.confirm(text.current)) {
        leaving = true;
        window.history.back();
      } else {
        pushTrap();
      }
    };
    pushTrap();
    window.addEventListener('beforeunload', onBeforeUnload);
    window.addEventListener('popstate', onPopState);
    return () => {
      window.removeEventListener('beforeunload', onBeforeUnload);
      window.removeEventListener('popstate', onPopState);
    };
  }, [active]);
}

/** Asks before an in-app link leaves the page. */
export function confirmLeave(message: string): Promise<boolean> {
  return Promise.resolve(typeof window === 'undefined' || window.confirm(message));
}
