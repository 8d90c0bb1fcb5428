import { useState } from 'preact/hooks';
import { applyTheme, loadTheme, THEME_LABELS, THEMES, type Theme } from '../models/theme';

/** One large button that steps through Auto → Sunlight → Night. */
export function ThemeSwitch() {
  const [theme, setTheme] = useState<Theme>(loadTheme());
  const next = THEMES[(THEMES.indexOf(theme) + 1) % THEMES.length] ?? 'auto';
  return (
    <button
      type="button"
      class="button button--quiet"
      data-testid="theme-switch"
      aria-label={`Display: ${THEME_LABELS[theme]}. Switch to ${THEME_LABELS[next]}.`}
      onClick={() => {
        applyTheme(next);
        setTheme(next);
      }}
    >
      Display: {THEME_LABELS[theme]}
    </button>
  );
}
