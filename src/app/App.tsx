import { DataBanner } from './components/DataBanner';
import { Footer } from './components/Footer';
import { Header } from './components/Header';
import { UpdateBanner } from './components/UpdateBanner';
import { Link, lazyScreen, usePath } from './router';
import { Home } from './screens/Home';

/** Screens by address. Each screen after the first paint is its own chunk (and precached). */
const ROUTES: Array<{ path: string; label: string; screen: ReturnType<typeof lazyScreen> | typeof Home }> = [
  { path: '/', label: 'Home', screen: Home },
  { path: '/device', label: 'This tablet', screen: lazyScreen(() => import('./screens/Device')) },
];

export function App() {
  const path = usePath();
  const route = ROUTES.find((candidate) => candidate.path === path);
  const Screen = route?.screen;
  return (
    <div class="shell">
      <Header />
      <UpdateBanner />
      <DataBanner />
      <nav class="nav" aria-label="Screens">
        {ROUTES.map((candidate) => (
          <Link key={candidate.path} href={candidate.path} class="nav__link" current={candidate.path === path}>
            {candidate.label}
          </Link>
        ))}
      </nav>
      <main class="main" id="main">
        {Screen ? (
          <Screen />
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
