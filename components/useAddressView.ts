import { router, useLocalSearchParams } from 'expo-router';
import { useCallback, useMemo } from 'react';
import type { AddressParams, AddressView } from './viewParams';

/**
 * A route's view read from its address, and a setter that writes the whole view back with
 * router.setParams (one history entry is replaced, not added; keys of the view not in the new
 * value are cleared, so a cleared filter leaves the address).
 */
export function useAddressView<T>(view: AddressView<T>): [T, (next: T) => void] {
  const params = useLocalSearchParams() as AddressParams;
  // Only the view's own keys matter; the same address gives the same object.
  const own = JSON.stringify(view.keys.map((k) => params[k] ?? null));
  // eslint-disable-next-line react-hooks/exhaustive-deps -- `own` stands for the view's part of params
  const value = useMemo(() => view.parse(params), [view, own]);
  const set = useCallback(
    (next: T) => {
      const written = view.toParams(next);
      router.setParams(Object.fromEntries(view.keys.map((k) => [k, written[k]])));
    },
    [view],
  );
  return [value, set];
}
