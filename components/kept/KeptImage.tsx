import { useEffect, useMemo, useState } from 'react';
import { Image, View, type ImageProps } from 'react-native';
import { useKeptState } from './registry';
import { keptStores } from './storage';

/**
 * The address to show a photo thumbnail from: the Blob kept on this phone (an object URL, so it
 * shows with no network) when its level is kept, else the server's address. Null while the kept
 * Blob is read, so an offline page never asks the network for it.
 */
export function useKeptImageUri(uri: string | null | undefined): string | null {
  const state = useKeptState();
  const kept = useMemo(() => Boolean(uri) && state.levels.some((l) => l.photos.includes(uri!)), [state, uri]);
  const [local, setLocal] = useState<{ uri: string; objectUrl: string } | null>(null);
  useEffect(() => {
    if (!uri || !kept) return;
    let live = true;
    let objectUrl: string | null = null;
    void keptStores()
      .photos.get<Blob>(uri)
      .then((blob) => {
        if (!live || !blob) return;
        objectUrl = URL.createObjectURL(blob);
        setLocal({ uri, objectUrl });
      })
      .catch(() => undefined);
    return () => {
      live = false;
      if (objectUrl) URL.revokeObjectURL(objectUrl);
    };
  }, [uri, kept]);
  if (!uri) return null;
  if (!kept) return uri;
  return local?.uri === uri ? local.objectUrl : null;
}

/** An Image of a photo thumbnail that shows the kept copy when there is one. */
export function KeptImage({ uri, ...rest }: Omit<ImageProps, 'source'> & { uri: string }) {
  const shown = useKeptImageUri(uri);
  if (!shown) return <View style={rest.style as never} accessibilityLabel={rest.accessibilityLabel} />;
  return <Image {...rest} source={{ uri: shown }} />;
}
