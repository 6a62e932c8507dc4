import { useEffect, useState, type DependencyList } from 'react';

/**
 * What `load` reads from the store, read again whenever `deps` change; undefined until the first
 * read is in. The previous value stays on screen meanwhile, and a read overtaken by a newer one is dropped.
 */
export function useStored<T>(load: () => Promise<T>, deps: DependencyList): T | undefined {
  const [value, setValue] = useState<T>();
  useEffect(() => {
    let live = true;
    void load().then((v) => { if (live) setValue(v); });
    return () => { live = false; };
    // The caller names what the read depends on; load is taken from that render.
  }, deps);
  return value;
}
