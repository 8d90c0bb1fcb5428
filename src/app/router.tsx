import type { ComponentChildren, ComponentType, TargetedMouseEvent } from 'preact';
import { useEffect, useState } from 'preact/hooks';
import { observable } from './models/observable';

/** The in-app address (path only). The server and the service worker answer every such path with the shell. */
const currentPath = observable(window.location.pathname);
window.addEventListener('popstate', () => currentPath.set(window.location.pathname));

export function navigate(path: string): void {
  if (path === window.location.pathname) return;
  window.history.pushState(null, '', path);
  currentPath.set(path);
  window.scrollTo(0, 0);
}

export function usePath(): string {
  const [path, setPath] = useState(currentPath.get());
  useEffect(() => currentPath.subscribe(setPath), []);
  return path;
}

export function Link(props: { href: string; class?: string; children: ComponentChildren; current?: boolean }) {
  const onClick = (event: TargetedMouseEvent<HTMLAnchorElement>) => {
    if (event.defaultPrevented || event.button !== 0 || event.metaKey || event.ctrlKey || event.shiftKey) return;
    event.preventDefault();
    navigate(props.href);
  };
  return (
    <a href={props.href} class={props.class} onClick={onClick} aria-current={props.current ? 'page' : undefined}>
      {props.children}
    </a>
  );
}

/** Params of a path against a pattern like `/rounds/:id`, or null when it does not match. */
export function matchPath(pattern: string, path: string): Record<string, string> | null {
  const want = pattern.split('/').filter(Boolean);
  const have = path.split('/').filter(Boolean);
  if (want.length !== have.length) return null;
  const params: Record<string, string> = {};
  for (let index = 0; index < want.length; index += 1) {
    const part = want[index] as string;
    const value = have[index] as string;
    if (part.startsWith(':')) params[part.slice(1)] = decodeURIComponent(value);
    else if (part !== value) return null;
  }
  return params;
}

export type ScreenProps = { params: Record<string, string> };
type ScreenModule = { default: ComponentType<ScreenProps> };

/**
 * Loads a screen's chunk on first use. Every chunk is precached by the service worker, so this works offline;
 * a failure means the tablet never finished caching the app, and the message says what to do.
 */
export function lazyScreen(load: () => Promise<ScreenModule>): ComponentType<ScreenProps> {
  let loaded: ComponentType<ScreenProps> | null = null;
  return function LazyScreen(props: ScreenProps) {
    const [screen, setScreen] = useState<{ component: ComponentType<ScreenProps> | null; error: string | null }>({
      component: loaded,
      error: null,
    });
    useEffect(() => {
      if (loaded) return;
      let cancelled = false;
      load().then(
        (module) => {
          loaded = module.default;
          if (!cancelled) setScreen({ component: loaded, error: null });
        },
        (error: unknown) => {
          if (!cancelled) setScreen({ component: null, error: error instanceof Error ? error.message : String(error) });
        },
      );
      return () => {
        cancelled = true;
      };
    }, []);
    if (screen.error) {
      return (
        <section class="card card--alarm" role="alert">
          <h2>This screen could not load</h2>
          <p>
            Part of the app is missing on this tablet. Connect to the site network once and reload so the app can finish
            storing itself. ({screen.error})
          </p>
        </section>
      );
    }
    const Screen = screen.component;
    return Screen ? <Screen {...props} /> : <p class="loading">Loading…</p>;
  };
}
