import type { ComponentType } from 'preact';
import { DataBanner } from './components/DataBanner';
import { Footer } from './components/Footer';
import { Header } from './components/Header';
import { UpdateBanner } from './components/UpdateBanner';
import { Link, lazyScreen, matchPath, type ScreenProps, usePath } from './router';
import { Home } from './screens/Home';

const maintenance = lazyScreen(() => import('./screens/Maintenance'));
const trends = lazyScreen(() => import('./screens/Trends'));

/** Screens by address. Each screen after the first paint is its own chunk (and precached). */
const ROUTES: Array<{ pattern: string; label?: string; screen: ComponentType<ScreenProps> }> = [
  { pattern: '/', label: 'Home', screen: Home },
  { pattern: '/rounds', label: 'Rounds', screen: lazyScreen(() => import('./screens/Rounds')) },
  { pattern: '/rounds/:id', screen: lazyScreen(() => import('./screens/Round')) },
  { pattern: '/maintenance', label: "Mechanic's log", screen: maintenance },
  { pattern: '/maintenance/:task', screen: maintenance },
  { pattern: '/review', label: 'Review', screen: lazyScreen(() => import('./screens/Review')) },
  { pattern: '/trends', label: 'Trends', screen: trends },
  { pattern: '/trends/:pointId', screen: trends },
  { pattern: '/trends/covers/:machineId/:cylinderId', screen: trends },
  { pattern: '/trends/bearings/:machineId', screen: trends },
  { pattern: '/machines/:machineId', screen: lazyScreen(() => import('./screens/Machine')) },
  { pattern: '/valve-life', screen: lazyScreen(() => import('./screens/ValveLife')) },
  { pattern: '/export', screen: lazyScreen(() => import('./screens/Export')) },
  { pattern: '/device', label: 'This tablet', screen: lazyScreen(() => import('./screens/Device')) },
];

export function App() {
  const path = usePath();
  let params: Record<string, string> | null = null;
  const route = ROUTES.find((candidate) => {
    params = matchPath(candidate.pattern, path);
    return params !== null;
  });
  const Screen = route?.screen;
  const section = ROUTES.find(
    (candidate) => candidate.label && (candidate.pattern === '/' ? path === '/' : path.startsWith(candidate.pattern)),
  );
  return (
    <div class="shell">
      <Header />
      <UpdateBanner />
      <DataBanner />
      <nav class="nav" aria-label="Screens">
        {ROUTES.filter((candidate) => candidate.label).map((candidate) => (
          <Link key={candidate.pattern} href={candidate.pattern} class="nav__link" current={candidate === section}>
            {candidate.label}
          </Link>
        ))}
      </nav>
      <main class="main" id="main">
        {Screen ? (
          <Screen params={params ?? {}} />
        ) : (
          <section class="card">
            <h2>Nothing here</h2>
            <p>
              There is no screen at <code>{path}</code>. <Link href="/">Go to Home</Link>.
            </p>
          </section>
        )}
      </main>
      <Footer />
    </div>
  );
}
