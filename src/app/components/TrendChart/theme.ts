/** The chart's colours from the theme (CSS custom properties, light-dark() values) and a hook that changes with it. */
import { useEffect, useState } from 'preact/hooks';

export interface ChartColours {
  text: string;
  muted: string;
  border: string;
  bg: string;
  accent: string;
  watch: string;
  alarm: string;
  band: string;
  series: string[];
  font: string;
}

/** Resolves the theme's colours through a hidden element inside the chart. */
export function readChartColours(host: HTMLElement, seriesCount: number): ChartColours {
  const probe = document.createElement('span');
  probe.style.display = 'none';
  host.appendChild(probe);
  const resolve = (name: string, fallback: string) => {
    probe.style.color = fallback;
    probe.style.color = `var(${name}, ${fallback})`;
    return getComputedStyle(probe).color || fallback;
  };
  const colours: ChartColours = {
    text: resolve('--text', '#000'),
    muted: resolve('--muted', '#333'),
    border: resolve('--border', '#000'),
    bg: resolve('--surface', '#fff'),
    accent: resolve('--accent', '#0a3a8c'),
    watch: resolve('--watch', '#8a5a00'),
    alarm: resolve('--alarm', '#b00020'),
    band: resolve('--xy-band', '#888'),
    series: Array.from({ length: seriesCount }, (_, k) => resolve(`--trend-${k + 1}`, '#000')),
    font: getComputedStyle(host).fontFamily || 'sans-serif',
  };
  probe.remove();
  return colours;
}

/** Changes whenever the theme might have changed: the theme switch, or the tablet's own light/dark setting. */
export function useThemeVersion(): number {
  const [version, setVersion] = useState(0);
  useEffect(() => {
    const bump = () => setVersion((v) => v + 1);
    const observer = new MutationObserver(bump);
    observer.observe(document.documentElement, { attributes: true, attributeFilter: ['data-theme'] });
    const media = window.matchMedia?.('(prefers-color-scheme: dark)');
    media?.addEventListener('change', bump);
    return () => {
      observer.disconnect();
      media?.removeEventListener('change', bump);
    };
  }, []);
  return version;
}
