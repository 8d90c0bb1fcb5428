import { useEffect, useState } from 'preact/hooks';

/** A value that screens can watch. Models own one; components read it with `useObservable`. */
export interface Observable<T> {
  get(): T;
  subscribe(listener: (value: T) => void): () => void;
}

export interface WritableObservable<T> extends Observable<T> {
  set(value: T): void;
}

export function observable<T>(initial: T): WritableObservable<T> {
  let value = initial;
  const listeners = new Set<(value: T) => void>();
  return {
    get: () => value,
    set(next) {
      if (Object.is(next, value)) return;
      value = next;
      for (const listener of [...listeners]) listener(value);
    },
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
  };
}

/** Re-renders the component whenever the observable changes. */
export function useObservable<T>(source: Observable<T>): T {
  const [value, setValue] = useState(source.get());
  useEffect(() => {
    setValue(source.get());
    return source.subscribe(setValue);
  }, [source]);
  return value;
}
