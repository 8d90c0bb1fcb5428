export const THEMES = ['auto', 'sun', 'night'] as const;
export type Theme = (typeof THEMES)[number];

export const THEME_LABELS: Record<Theme, string> = {
  auto: 'Auto',
  sun: 'Sunlight',
  night: 'Night',
};

const THEME_KEY = 'crankhouse.theme';

/** Pure: a stored value back to a theme, falling back to auto for anything unknown. */
export function parseTheme(value: string | null): Theme {
  return (THEMES as readonly string[]).includes(value ?? '') ? (value as Theme) : 'auto';
}

export function loadTheme(storage: Pick<Storage, 'getItem'> = localStorage): Theme {
  try {
    return parseTheme(storage.getItem(THEME_KEY));
  } catch {
    return 'auto';
  }
}

/** Applies the theme to the page and remembers it on this tablet (a display preference, not a record). */
export function applyTheme(theme: Theme, storage: Pick<Storage, 'setItem'> = localStorage): void {
  document.documentElement.dataset.theme = theme;
  try {
    storage.setItem(THEME_KEY, theme);
  } catch {
    // Private mode or a full disk: the theme still applies for this visit.
  }
}
