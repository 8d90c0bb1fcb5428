import { useEffect, useMemo, useState } from 'preact/hooks';
import { fromSI, unitInfo } from '../../../calc';
import type { FinishedRound, SiteConfig } from '../../../schema';
import { type ChartSeries, MultiTrendChart } from '../../components/TrendChart';
import { XYChart } from '../../components/TrendChart/XYChart';
import { describeStoreError } from '../../models/data';
import {
  type MachineView as MachineViewModel,
  machineView,
  type PvLoop,
  type StageQuantity,
  type StageView,
  type ThrowView,
} from '../../models/machine-view';
import { displayUnits } from '../../models/round-entry';
import { Link, type ScreenProps } from '../../router';
import { useServices } from '../../services';

type Units = ReturnType<typeof displayUnits>;

const sig = (value: number, digits = 4) => String(Number(value.toPrecision(digits)));
const kN = (newtons: number) => `${sig(newtons / 1000)} kN`;
const day = (iso: string) => new Date(iso).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' });

function converter(units: Units, barometricPa: number) {
  const to = (value: number, unit: string) => fromSI(value, unit, { barometricPa });
  return {
    pressure: (pa: number) => to(pa, units.pressure),
    temperature: (k: number) => to(k, units.temperature),
    power: (w: number) => to(w, units.power),
    flow: (m3s: number) => to(m3s, units.volumeFlow),
    label: (unit: string) => unitInfo(unit).label,
  };
}
type Convert = ReturnType<typeof converter>;

type Loaded =
  | { kind: 'none' }
  | { kind: 'unknown'; config: SiteConfig }
  | { kind: 'view'; config: SiteConfig; view: MachineViewModel };

/** The supervisor's machine view: performance over time, power curve, rod load and modelled PV loops. */
export default function Machine(props: ScreenProps) {
  const { data } = useServices();
  const machineId = props.params?.machineId ?? '';
  const [loaded, setLoaded] = useState<Loaded | undefined>(undefined);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    let live = true;
    setLoaded(undefined);
    setError(null);
    (async (): Promise<Loaded> => {
      const store = await data.store();
      const config = await store.getConfig();
      if (!config) return { kind: 'none' };
      if (!config.machines.some((m) => m.id === machineId)) return { kind: 'unknown', config };
      const rounds = await store.listRounds({ state: 'finished' });
      const finished: FinishedRound[] = await Promise.all(
        rounds.map(async (round) => ({
          round,
          readings: await store.readingsOf(round.id),
          findings: await store.findingsOf(round.id),
        })),
      );
      return { kind: 'view', config, view: machineView(config, machineId, finished) };
    })().then(
      (result) => {
        if (live) setLoaded(result);
      },
      (e: unknown) => {
        if (!live) return;
        setError(e instanceof Error && e.name === 'MachineViewError' ? e.message : describeStoreError(e));
      },
    );
    return () => {
      live = false;
    };
  }, [data, machineId]);

  if (error) {
    return (
      <section class="card card--alarm" role="alert">
        <h2>This machine could not be shown</h2>
        <p>{error}</p>
      </section>
    );
  }
  if (loaded === undefined) return <p class="loading">Loading…</p>;
  if (loaded.kind === 'none') {
    return (
      <section class="card card--watch">
        <h2>No site configuration on this tablet yet</h2>
        <p>Connect to the site network once so the tablet can load its machines, then come back here.</p>
      </section>
    );
  }
  if (loaded.kind === 'unknown') {
    return (
      <section class="card" data-testid="machine-list">
        <h2>{machineId ? `No machine ${machineId} at this site` : 'Machines'}</h2>
        <p>Pick a machine:</p>
        <ul class="machine-view__links">
          {loaded.config.machines.map((m) => (
            <li key={m.id}>
              <Link href={`/machines/${encodeURIComponent(m.id)}`}>
                {m.name}
                {m.service ? ` · ${m.service}` : ''}
              </Link>
            </li>
          ))}
        </ul>
      </section>
    );
  }
  return <MachineScreen config={loaded.config} view={loaded.view} />;
}

function MachineScreen(props: { config: SiteConfig; view: MachineViewModel }) {
  const { view } = props;
  const units = displayUnits(props.config);
  const convert = converter(units, view.barometricPa);
  return (
    <div class="stack" data-testid="machine-view">
      <section class="card">
        <h2>{view.machine.name}</h2>
        <p>
          {view.roundCount} finished {view.roundCount === 1 ? 'round' : 'rounds'} on this tablet read this machine.
          Predictions and models use ideal valves and the gas of each stage; pressures are shown in{' '}
          {convert.label(units.pressure)}.
        </p>
        {view.notes.map((note) => (
          <p key={note} class="card--watch">
            {note}
          </p>
        ))}
      </section>
      {view.stages.map((stage) => (
        <StageSection key={stage.stage.id} stage={stage} units={units} convert={convert} />
      ))}
      {view.throws.map((t) => (
        <RodLoadSection key={t.throw} view={t} />
      ))}
      {view.pvLoops.length ? (
        <section class="card">
          <h2>Modelled pressure-volume loops</h2>
          <div class="machine-view__grid">
            {view.pvLoops.map((loop) => (
              <PvSection key={`${loop.cylinderId}-${loop.end}`} loop={loop} units={units} convert={convert} />
            ))}
          </div>
        </section>
      ) : null}
    </div>
  );
}

function quantityChart(
  quantity: StageQuantity,
  title: string,
  unit: string,
  to: (si: number) => number,
): { series: ChartSeries[]; summary: string } {
  const series = quantity.lines.map((line) => ({ label: line.label, times: line.times, values: line.values.map(to) }));
  const last = series.map((s) => {
    const v = s.values.at(-1);
    return v === undefined || v === null ? null : `${s.label} ${sig(v, 3)} ${unit}`;
  });
  const summary = series.length
    ? `${title}: latest ${last.filter(Boolean).join(', ')}.${quantity.observedNote ? ` ${quantity.observedNote}` : ''}`
    : `${title}: no rounds with these readings yet.`;
  return { series, summary };
}

function StageSection(props: { stage: StageView; units: Units; convert: Convert }) {
  const { stage, units, convert } = props;
  const tUnit = convert.label(units.temperature);
  const pUnit = convert.label(units.power);
  const fUnit = `${convert.label(units.volumeFlow)} (standard)`;
  const charts = [
    {
      q: stage.dischargeTemperature,
      title: 'Discharge temperature, observed and predicted',
      unit: tUnit,
      to: convert.temperature,
    },
    { q: stage.volumetricEfficiency, title: 'Volumetric efficiency', unit: '%', to: (v: number) => v * 100 },
    { q: stage.capacity, title: 'Capacity', unit: fUnit, to: convert.flow },
    { q: stage.power, title: 'Shaft power', unit: pUnit, to: convert.power },
  ];
  return (
    <section class="card" data-testid={`stage-${stage.stage.id}`} aria-labelledby={`stage-h-${stage.stage.id}`}>
      <h2 id={`stage-h-${stage.stage.id}`}>
        Stage {stage.stage.index} (cylinders {stage.cylinderIds.join(', ')})
      </h2>
      <div class="machine-view__grid">
        {charts.map((c) => {
          const { series, summary } = quantityChart(c.q, c.title, c.unit, c.to);
          return <MultiTrendChart key={c.q.quantity} series={series} unit={c.unit} summary={summary} title={c.title} />;
        })}
      </div>
      <PowerCurveSection stage={stage} units={units} convert={convert} />
    </section>
  );
}

function PowerCurveSection(props: { stage: StageView; units: Units; convert: Convert }) {
  const { stage, units, convert } = props;
  const curve = stage.powerCurve;
  const pLabel = convert.label(units.pressure);
  const wLabel = convert.label(units.power);
  const chart = useMemo(() => {
    if (!curve) return null;
    return {
      series: [
        {
          label: 'Isentropic gas power',
          x: curve.points.map((p) => convert.pressure(p.dischargePressurePa)),
          y: curve.points.map((p) => convert.power(p.powerW)),
        },
      ],
      markers: [
        {
          x: convert.pressure(curve.operating.dischargePressurePa),
          y: convert.power(curve.operating.powerW),
          label: 'Today',
          shape: 'circle' as const,
        },
        {
          x: convert.pressure(curve.peak.dischargePressurePa),
          y: convert.power(curve.peak.powerW),
          label: 'Peak',
          shape: 'diamond' as const,
        },
      ],
    };
  }, [curve]);
  if (!curve || !chart || !stage.latest) {
    return (
      <p data-testid="power-curve" class="card--watch">
        Power curve: {stage.powerCurveNote}
      </p>
    );
  }
  const p = (pa: number) => `${sig(convert.pressure(pa))} ${pLabel}`;
  const w = (watts: number) => `${sig(convert.power(watts), 3)} ${wLabel}`;
  const side = curve.operating.dischargePressurePa < curve.peak.dischargePressurePa ? 'below' : 'above';
  const step = Math.max(1, Math.floor(curve.points.length / 12));
  return (
    <XYChart
      testId="power-curve"
      title={`Power against discharge pressure at suction ${p(curve.suctionPressurePa)} (round of ${day(stage.latest.at)})`}
      xLabel={`Discharge pressure, ${pLabel}`}
      yLabel={`Power, ${wLabel}`}
      series={chart.series}
      markers={chart.markers}
    >
      <p class="trend-chart__summary" data-testid="power-curve-summary">
        Today at {p(curve.operating.dischargePressurePa)} the stage takes about {w(curve.operating.powerW)} of
        isentropic gas power. Power peaks at {w(curve.peak.powerW)} at {p(curve.peak.dischargePressurePa)}, so today is{' '}
        {side} the peak:{' '}
        {side === 'below' ? 'a higher discharge pressure adds load' : 'a higher discharge pressure lowers load'}.
        Delivery stops at {p(curve.noDeliveryPressurePa)}.
      </p>
      <details class="trend-chart__details">
        <summary>Curve as a table</summary>
        <table class="trend-chart__table">
          <caption>Isentropic gas power against discharge pressure</caption>
          <thead>
            <tr>
              <th scope="col">Discharge pressure ({pLabel})</th>
              <th scope="col">Power ({wLabel})</th>
            </tr>
          </thead>
          <tbody>
            {curve.points
              .filter((_, k) => k % step === 0)
              .map((point) => (
                <tr key={point.dischargePressurePa}>
                  <td>{sig(convert.pressure(point.dischargePressurePa))}</td>
                  <td>{sig(convert.power(point.powerW), 3)}</td>
                </tr>
              ))}
          </tbody>
        </table>
      </details>
    </XYChart>
  );
}

const ARC_WORDS = { compression: 'compression', tension: 'tension' } as const;

function RodLoadSection(props: { view: ThrowView }) {
  const t = props.view;
  const chart = useMemo(
    () => ({
      series: [
        { label: 'Combined (gas + inertia)', x: t.crankDeg, y: t.combinedN.map((n) => n / 1000) },
        { label: 'Gas only', x: t.crankDeg, y: t.gasN.map((n) => n / 1000), dash: [8, 4] },
      ],
      lines: [
        {
          value: t.ratedCompressionN / 1000,
          label: `Rated compression ${kN(t.ratedCompressionN)}`,
          kind: 'limit' as const,
        },
        { value: -t.ratedTensionN / 1000, label: `Rated tension ${kN(t.ratedTensionN)}`, kind: 'limit' as const },
      ],
      bands: t.arcs.filter((a) => a.reversed).map((a) => ({ from: a.fromDeg, to: a.toDeg, label: 'reversed' })),
      markers: [
        {
          x: t.peakCompression.atDeg,
          y: t.peakCompression.loadN / 1000,
          label: 'Peak compression',
          shape: 'diamond' as const,
        },
        { x: t.peakTension.atDeg, y: -t.peakTension.loadN / 1000, label: 'Peak tension', shape: 'diamond' as const },
      ],
    }),
    [t],
  );
  const arcWords = (a: ThrowView['arcs'][number]) => `${sig(a.fromDeg, 4)}° to ${sig(a.toDeg, 4)}°`;
  return (
    <section class="card" data-testid={`rod-load-${t.throw}`}>
      <XYChart
        testId={`rod-load-chart-${t.throw}`}
        title={`Throw ${t.throw} (cylinder ${t.cylinderId}): rod load against crank angle (round of ${day(t.at)})`}
        xLabel="Crank angle from head-end dead centre, °"
        yLabel="Load, kN (+ compression, − tension)"
        series={chart.series}
        lines={chart.lines}
        bands={chart.bands}
        markers={chart.markers}
        xRange={[0, 360]}
        xTicks={[0, 90, 180, 270, 360]}
      >
        <p class="trend-chart__summary" data-testid={`rod-load-summary-${t.throw}`}>
          Peak compression {kN(t.peakCompression.loadN)} at {sig(t.peakCompression.atDeg)}° against a rating of{' '}
          {kN(t.ratedCompressionN)}; peak tension {kN(t.peakTension.loadN)} at {sig(t.peakTension.atDeg)}° against{' '}
          {kN(t.ratedTensionN)}. Reversal {sig(t.reversal.degrees)}° at {sig(t.reversal.fraction * 100, 3)} % of the
          opposite peak: {t.reversal.meetsCriterion ? 'meets the criterion' : 'does not meet the criterion'}. Hatched
          bands mark where the load is reversed.
        </p>
        <table class="trend-chart__table">
          <caption>Load direction by crank angle</caption>
          <thead>
            <tr>
              <th scope="col">Crank angle</th>
              <th scope="col">Direction</th>
              <th scope="col">Reversed?</th>
            </tr>
          </thead>
          <tbody>
            {t.arcs.map((a) => (
              <tr key={a.fromDeg}>
                <td>{arcWords(a)}</td>
                <td>{ARC_WORDS[a.direction]}</td>
                <td>{a.reversed ? 'yes, reversal present' : 'no'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </XYChart>
    </section>
  );
}

function PvSection(props: { loop: PvLoop; units: Units; convert: Convert }) {
  const { loop, units, convert } = props;
  const pLabel = convert.label(units.pressure);
  const endWord = loop.end === 'head' ? 'head end' : 'crank end';
  const chart = useMemo(
    () => ({
      series: [
        {
          label: 'Modelled loop',
          x: [...loop.volumeM3, loop.volumeM3[0] as number].map((v) => v * 1000),
          y: [...loop.pressurePa, loop.pressurePa[0] as number].map(convert.pressure),
        },
      ],
      lines: [
        { value: convert.pressure(loop.dischargePressurePa), label: 'Observed discharge', kind: 'reference' as const },
        { value: convert.pressure(loop.suctionPressurePa), label: 'Observed suction', kind: 'reference' as const },
      ],
    }),
    [loop],
  );
  const p = (pa: number) => `${sig(convert.pressure(pa))} ${pLabel}`;
  return (
    <div data-testid={`pv-${loop.cylinderId}-${loop.end}`}>
      <XYChart
        testId={`pv-chart-${loop.cylinderId}-${loop.end}`}
        title={`Cylinder ${loop.cylinderId} ${endWord}`}
        xLabel="Cylinder volume, L"
        yLabel={`Pressure, ${pLabel}`}
        series={chart.series}
        lines={chart.lines}
      >
        <p class="trend-chart__summary">
          Ideal-valve loop between the observed suction {p(loop.suctionPressurePa)} and discharge{' '}
          {p(loop.dischargePressurePa)}, exponent {sig(loop.exponent, 3)}: clearance{' '}
          {sig(loop.clearanceVolumeM3 * 1000, 3)} L, swept {sig(loop.sweptVolumeM3 * 1000, 3)} L.{' '}
          {loop.suctionOpensDeg === null
            ? 'Suction valves never open.'
            : `Suction opens at ${sig(loop.suctionOpensDeg)}°`}
          {loop.dischargeOpensDeg === null
            ? '; discharge valves never open.'
            : `, discharge at ${sig(loop.dischargeOpensDeg)}°.`}{' '}
          Indicated work {sig(loop.workPerCycleJ / 1000, 3)} kJ per revolution, about{' '}
          {sig(convert.power(loop.indicatedPowerW), 3)} {convert.label(units.power)}.
        </p>
      </XYChart>
    </div>
  );
}
