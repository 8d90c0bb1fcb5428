/**
 * Screens with a half-filled form register here, so that an app update never reloads the page under them
 * and closing the tab asks first. A guard returns true while its form holds input not yet committed to the store.
 */
type Guard = () => boolean;

const guards = new Map<string, Guard>();

export function registerUnsavedInput(id: string, hasUnsavedInput: Guard): () => void {
  guards.set(id, hasUnsavedInput);
  return () => {
    if (guards.get(id) === hasUnsavedInput) guards.delete(id);
  };
}

export function hasUnsavedInput(): boolean {
  for (const guard of guards.values()) {
    if (guard()) return true;
  }
  return false;
}

export function installBeforeUnloadGuard(): void {
  window.addEventListener('beforeunload', (event) => {
    if (hasUnsavedInput()) event.preventDefault();
  });
}
