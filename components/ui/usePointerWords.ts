/**
 * Words for pressing something that fit the device: "tap" on a touch screen, "click" with a mouse
 * or trackpad, and the neutral "select" when the device does not say (a web view without media
 * queries). A phone app is always touch. On the web the answer follows the primary pointer
 * (`(pointer: coarse)` / `(pointer: fine)`) and changes with it (a tablet docked to a keyboard and
 * trackpad).
 */
import { useEffect, useState } from 'react';
import { Platform } from 'react-native';

export type PointerKind = 'touch' | 'mouse' | 'unknown';

export interface PointerWords {
  kind: PointerKind;
  /** "tap", "click" or "select", for the middle of a sentence. */
  press: string;
  /** "Tap", "Click" or "Select", to begin one. */
  Press: string;
}

const WORDS: Record<PointerKind, PointerWords> = {
  touch: { kind: 'touch', press: 'tap', Press: 'Tap' },
  mouse: { kind: 'mouse', press: 'click', Press: 'Click' },
  unknown: { kind: 'unknown', press: 'select', Press: 'Select' },
};

type MatchMedia = (query: string) => { matches: boolean; addEventListener?: (type: 'change', fn: () => void) => void; removeEventListener?: (type: 'change', fn: () => void) => void };

function matchMediaOf(): MatchMedia | null {
  const w = globalThis as { matchMedia?: MatchMedia };
  return typeof w.matchMedia === 'function' ? w.matchMedia.bind(globalThis) : null;
}

export function pointerKind(): PointerKind {
  const match = matchMediaOf();
  if (!match) return Platform.OS === 'web' ? 'unknown' : 'touch';
  if (match('(pointer: coarse)').matches) return 'touch';
  if (match('(pointer: fine)').matches) return 'mouse';
  return 'unknown';
}

export function pointerWords(kind: PointerKind = pointerKind()): PointerWords {
  return WORDS[kind];
}

export function usePointerWords(): PointerWords {
  const [kind, setKind] = useState<PointerKind>(pointerKind);
  useEffect(() => {
    const match = matchMediaOf();
    if (!match) return;
    const queries = [match('(pointer: coarse)'), match('(pointer: fine)')];
    const update = () => setKind(pointerKind());
    for (const q of queries) q.addEventListener?.('change', update);
    return () => {
      for (const q of queries) q.removeEventListener?.('change', update);
    };
  }, []);
  return WORDS[kind];
}
