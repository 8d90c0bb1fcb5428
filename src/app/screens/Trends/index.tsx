import { useEffect, useState } from 'preact/hooks';
import type { CheckPoint, Reading, SiteConfig } from '../../../schema';
import { MultiTrendChart, TrendChart } from '../../components/TrendChart';
import { describeStoreError } from '../../models/data';
import {
  allPoints,
  bearingPoints,
  coverPoints,
  isChartable,
  type MultiTrend,
  multiTrend,
  type PointTrend,
  pointTrend,
} from '../../models/trend';
import { Link, type ScreenProps } from '../../router';
import { useServices } from '../../services';

/** At most this many readings per point are charted (the store's own limit for one query). */
const HISTORY_LIMIT = 10_000;

type View =
  | { kind: 'list' }
  | { kind: 'point'; pointId: string }
  | { kind: 'covers'; machineId: string; cylinderId: string }
  | { kind: 'bearings'; machineId: string };

function viewOf(params: Record<string, string>): View {
  if (params.machineId && params.cylinderId)
    return { kind: 'covers', machineId: params.machineId, cylinderId: params.cylinderId };
  if (params.machineId) return { kind: 'bearings', machineId: params.machineId };
  if (params.pointId) return { kind: 'point', pointId: params.pointId };
  return { kind: 'list' };
}

type Loaded =
  | { kind: 'list'; config: SiteConfig }
  | { kind: 'point'; trend: PointTrend; machine: string }
  | { kind: 'multi'; trend: MultiTrend };

async function readingsOf(
  store: { readingsForPoint(id: string, o: { limit: number }): Promise<Reading[]> },
  points: CheckPoint[],
) {
  const lists = await Promise.all(points.map((p) => store.readingsForPoint(p.id, { limit: HISTORY_LIMIT })));
  return lists.flat();
}

/** Trends of check points with their limits; several valve covers or bearings together. */
export default function Trends(props: ScreenProps) {
  const { data } = useServices();
  const params = props.params ?? {};
  const view = viewOf(params);
  const viewKey = JSON.stringify(view);
  const [loaded, setLoaded] = useState<Loaded | null | undefined>(undefined);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    let live = true;
    setLoaded(undefined);
    setError(null);
    (async () => {
      const store = await data.store();
      const config = await store.getConfig();
      if (!config) return null;
      const machineName = (id: string) => config.machines.find((m) => m.id === id)?.name ?? id;
      const now = new Date().toISOString();
      switch (view.kind) {
        case 'list':
          return { kind: 'list', config } as const;
        case 'point': {
          const readings = await store.readingsForPoint(view.pointId, { limit: HISTORY_LIMIT });
          const trend = pointTrend(config, view.pointId, readings, now);
          return { kind: 'point', trend, machine: machineName(trend.point.machineId) } as const;
        }
        case 'covers': {
          const points = coverPoints(config, view.machineId, view.cylinderId);
          const title = `${machineName(view.machineId)} cylinder ${view.cylinderId}: valve covers`;
          if (!points.length) throw new Error(`${title}: no valve cover points in the site configuration.`);
          const readings = await readingsOf(store, points);
          return {
            kind: 'multi',
            trend: multiTrend(
              config,
              title,
              points.map((p) => p.id),
              readings,
            ),
          } as const;
        }
        case 'bearings': {
          const points = bearingPoints(config, view.machineId);
          const title = `${machineName(view.machineId)}: bearings with oil supply temperature`;
          if (!points.length) throw new Error(`${title}: no bearing points in the site configuration.`);
          const readings = await readingsOf(store, points);
          return {
            kind: 'multi',
            trend: multiTrend(
              config,
              title,
              points.map((p) => p.id),
              readings,
            ),
          } as const;
        }
      }
    })().then(
      (result) => {
        if (live) setLoaded(result);
      },
      (e: unknown) => {
        if (!live) return;
        setLoaded(null);
        setError(describeStoreError(e));
      },
    );
    return () => {
      live = false;
    };
  }, [data, viewKey]);

  if (error) {
    return (
      <div class="stack">
        <section class="card card--alarm" role="alert">
          <h2>This trend could not be shown</h2>
          <p>{error}</p>
        </section>
        <p>
          <Link href="/trends">All trends</Link>
        </p>
      </div>
    );
  }
  if (loaded === undefined) return <p class="loading">Loading…</p>;
  if (loaded === null) {
    return (
      <section class="card card--watch">
        <h2>No site configuration on this tablet yet</h2>
        <p>Connect to the site network once so the tablet can load its check points, then come back here.</p>
      </section>
    );
  }
  if (loaded.kind === 'list') return <TrendList config={loaded.config} />;
  return (
    <div class="stack">
      <p>
        <Link href="/trends">All trends</Link>
      </p>
      <section class="card" aria-labelledby="trend-heading">
        {loaded.kind === 'point' ? (
          <>
            <h2 id="trend-heading">
              {loaded.machine} · {loaded.trend.point.label}
            </h2>
            <TrendChart trend={loaded.trend} />
          </>
        ) : (
          <>
            <h2 id="trend-heading">{loaded.trend.title}</h2>
            <MultiTrendChart series={loaded.trend.series} unit={loaded.trend.unit} summary={loaded.trend.summary} />
          </>
        )}
      </section>
    </div>
  );
}

/** Every numeric check point by machine, and the grouped charts of each machine. */
function TrendList(props: { config: SiteConfig }) {
  const points = allPoints(props.config).filter(isChartable);
  return (
    <div class="stack">
      {props.config.machines.map((machine) => {
        const mine = points.filter((p) => p.machineId === machine.id);
        const cylinders = machine.cylinders.filter((c) => coverPoints(props.config, machine.id, c.id).length > 0);
        const hasBearings = bearingPoints(props.config, machine.id).length > 0;
        if (!mine.length) return null;
        const headingId = `trends-${machine.id}`;
        return (
          <section key={machine.id} class="card" aria-labelledby={headingId}>
            <h2 id={headingId}>{machine.name}</h2>
            {cylinders.length || hasBearings ? (
              <>
                <h3 class="trends__subhead">Together on one chart</h3>
                <ul class="trends__links">
                  {cylinders.map((cylinder) => (
                    <li key={cylinder.id}>
                      <Link
                        href={`/trends/covers/${encodeURIComponent(machine.id)}/${encodeURIComponent(cylinder.id)}`}
                      >
                        Cylinder {cylinder.id}: valve covers together
                      </Link>
                    </li>
                  ))}
                  {hasBearings ? (
                    <li>
                      <Link href={`/trends/bearings/${encodeURIComponent(machine.id)}`}>Bearings with oil supply</Link>
                    </li>
                  ) : null}
                </ul>
              </>
            ) : null}
            <h3 class="trends__subhead">Check points</h3>
            <ul class="trends__links">
              {mine.map((point) => (
                <li key={point.id}>
                  <Link href={`/trends/${encodeURIComponent(point.id)}`}>{point.label}</Link>
                </li>
              ))}
            </ul>
          </section>
        );
      })}
    </div>
  );
}
