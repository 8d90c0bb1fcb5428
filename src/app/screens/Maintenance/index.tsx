import { useEffect, useMemo, useState } from 'preact/hooks';
import { bearingClearance, CalcError, riderBandWear, toSI } from '../../../calc';
import {
  AS_FOUND_WORDS,
  type BearingClearanceRecord,
  type LockoutAck,
  type Machine,
  PARTS,
  type RodDropRecord,
  type ValveChange,
} from '../../../schema';
import { CylinderDrawing } from '../../components/CylinderDrawing';
import { LockoutGate } from '../../components/LockoutGate';
import { hours, ValveLifeTable } from '../../components/ValveLifeTable';
import { describeStoreError } from '../../models/data';
import {
  acknowledgeTask,
  type MaintenanceContext,
  openingCautions,
  openMaintenance,
  saveMaintenance,
} from '../../models/maintenance';
import { type RecordPhoto, shrinkPhoto } from '../../models/photo';
import { positionHistories, rankPositions } from '../../models/valve-history';
import { Link, type ScreenProps } from '../../router';
import { useServices } from '../../services';

const TASKS = [
  { id: 'valve-change', title: 'Valve change', lockout: true },
  { id: 'bearing', title: 'Bearing clearance', lockout: true },
  { id: 'rod-drop', title: 'Rod drop', lockout: true },
  { id: 'history', title: 'Valve position history', lockout: false },
] as const;
type TaskId = (typeof TASKS)[number]['id'];

const NM_PER_FTLBF = 0.3048 * 4.4482216152605;
const LENGTH_UNITS = [
  { id: 'mm', label: 'mm' },
  { id: 'in', label: 'in' },
  { id: 'mil', label: 'mil' },
] as const;

const day = (iso: string) => new Date(iso).toLocaleDateString([], { dateStyle: 'medium' });

/** Parses a typed length in a unit to metres; null with a message when it is not a length. */
function lengthM(text: string, unit: string): { value: number } | { error: string } {
  const normalised = text.trim().replace(',', '.');
  if (!/^[-+]?(\d+\.?\d*|\.\d+)$/.test(normalised)) return { error: 'Enter a number, like 0.17.' };
  try {
    return { value: toSI(Number(normalised), unit) };
  } catch (error) {
    return { error: error instanceof CalcError ? error.message : String(error) };
  }
}

/** The mechanic's log: valve changes, bearing clearances and rod drop behind the lockout cautions, and valve life. */
export default function Maintenance({ params }: ScreenProps) {
  const { data } = useServices();
  const [context, setContext] = useState<MaintenanceContext | string | null>(null);
  useEffect(() => {
    data
      .store()
      .then(openMaintenance)
      .then(setContext, (e: unknown) => setContext(describeStoreError(e)));
  }, [data]);
  const task = TASKS.find((t) => t.id === params.task)?.id ?? null;

  if (context === null) return <p class="loading">Loading…</p>;
  if (typeof context === 'string') {
    return (
      <section class="card card--watch" data-testid="maintenance-unavailable">
        <h2>The mechanic's log needs two things first</h2>
        <p>{context}</p>
      </section>
    );
  }
  return (
    <div class="stack">
      <nav class="actions" aria-label="Mechanic's tasks">
        {TASKS.map((t) => (
          <Link
            key={t.id}
            href={`/maintenance/${t.id}`}
            class={`button ${t.id === task ? '' : 'button--quiet'}`}
            current={t.id === task}
          >
            {t.title}
          </Link>
        ))}
      </nav>
      {task === null ? <Recent context={context} /> : <Task key={task} context={context} task={task} />}
    </div>
  );
}

function Recent({ context }: { context: MaintenanceContext }) {
  const [records, setRecords] = useState<{
    valves: ValveChange[];
    bearings: BearingClearanceRecord[];
    rods: RodDropRecord[];
  } | null>(null);
  useEffect(() => {
    void Promise.all([
      context.store.listRecords('valveChange'),
      context.store.listRecords('bearingClearance'),
      context.store.listRecords('rodDrop'),
    ]).then(([valves, bearings, rods]) => setRecords({ valves, bearings, rods }));
  }, [context]);
  return (
    <section class="card" aria-labelledby="recent-heading">
      <h2 id="recent-heading">Recent work on this tablet</h2>
      <p>
        Choose a task above. Every task that opens a machine starts with the lockout cautions; the site's isolation
        procedure, permits and local codes govern.
      </p>
      {records ? (
        <ul class="list" data-testid="recent-records">
          {[
            ...records.valves.map((v) => ({
              at: v.at,
              text: `${day(v.at)} · ${v.machineId} ${v.valvePositionId}: valve ${v.removedValveId || '?'} → ${v.installedValveId} (${v.reason})${v.photo ? ', with photo' : ''}`,
            })),
            ...records.bearings.map((b) => ({
              at: b.at,
              text: `${day(b.at)} · ${b.machineId} ${b.bearingId}: clearance ${b.result.message}`,
            })),
            ...records.rods.map((r) => ({
              at: r.at,
              text: `${day(r.at)} · ${r.machineId} ${r.cylinderId}: rod drop, wear ${(r.wearM * 1000).toFixed(3)} mm`,
            })),
          ]
            .sort((a, b) => Date.parse(b.at) - Date.parse(a.at))
            .slice(0, 12)
            .map((item) => (
              <li key={item.at + item.text}>{item.text}</li>
            ))}
        </ul>
      ) : null}
    </section>
  );
}

function Task({ context, task }: { context: MaintenanceContext; task: TaskId }) {
  const [machineId, setMachineId] = useState<string | null>(
    context.config.machines.length === 1 ? (context.config.machines[0]?.id ?? null) : null,
  );
  const machine = context.config.machines.find((m) => m.id === machineId) ?? null;
  return (
    <div class="stack">
      <section class="card" aria-labelledby="machine-heading">
        <h2 id="machine-heading">Machine</h2>
        <div class="actions">
          {context.config.machines.map((m) => (
            <button
              type="button"
              key={m.id}
              class={`button ${m.id === machineId ? '' : 'button--quiet'}`}
              aria-pressed={m.id === machineId}
              onClick={() => setMachineId(m.id)}
            >
              {m.name}
            </button>
          ))}
        </div>
      </section>
      {machine ? (
        task === 'history' ? (
          <History context={context} machine={machine} />
        ) : task === 'valve-change' ? (
          <ValveChangeTask key={machine.id} context={context} machine={machine} />
        ) : task === 'bearing' ? (
          <BearingTask key={machine.id} context={context} machine={machine} />
        ) : (
          <RodDropTask key={machine.id} context={context} machine={machine} />
        )
      ) : null}
    </div>
  );
}

/** The gate every opening task passes: shows the cautions, records the acknowledgement, then opens the form. */
function useGate(context: MaintenanceContext) {
  const [ack, setAck] = useState<LockoutAck | null>(null);
  const [open, setOpen] = useState(false);
  const cautions = openingCautions(context.config);
  const gate = (task: LockoutAck['task'], stepLabel: string) =>
    open && cautions ? (
      <LockoutGate
        cautions={cautions}
        stepLabel={stepLabel}
        person={context.person.name}
        onCancel={() => setOpen(false)}
        onAcknowledged={async (acknowledgements) => {
          setAck(await acknowledgeTask(context, task, cautions.id, acknowledgements));
          setOpen(false);
        }}
      />
    ) : null;
  const banner = (what: string) =>
    ack ? (
      <p class="lockout lockout--done" data-testid="task-unlocked">
        Cautions confirmed by {ack.by.name} at{' '}
        {new Date(ack.completedAt).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}.
      </p>
    ) : (
      <div class="lockout">
        <p>
          <strong>{what} opens the machine.</strong> Review and confirm each caution before you start.
        </p>
        <button
          type="button"
          class="button"
          data-testid="task-gate-open"
          disabled={!cautions}
          onClick={() => setOpen(true)}
        >
          Review the cautions
        </button>
      </div>
    );
  return { ack, gate, banner, reset: () => setAck(null) };
}

/** Words to pick any number of, as large toggle chips. */
function Chips(props: {
  label: string;
  options: readonly string[];
  chosen: string[];
  onChange: (chosen: string[]) => void;
}) {
  return (
    <>
      <p class="field__label">{props.label}</p>
      <div class="chips">
        {props.options.map((option) => {
          const on = props.chosen.includes(option);
          return (
            <button
              type="button"
              key={option}
              class={`chip ${on ? 'chip--on' : ''}`}
              aria-pressed={on}
              onClick={() => props.onChange(on ? props.chosen.filter((x) => x !== option) : [...props.chosen, option])}
            >
              {option}
            </button>
          );
        })}
      </div>
    </>
  );
}

/** A length typed on the numeric keypad with its unit beside it (kept as typed; converted to metres on save). */
function LengthField(props: {
  label: string;
  unitLabel: string;
  testId: string;
  value: string;
  unit: string;
  onValue: (value: string) => void;
  onUnit: (unit: string) => void;
}) {
  return (
    <div class="number">
      <label class="field">
        <span class="field__label">{props.label}</span>
        <input
          class="field__input number__input"
          inputmode="decimal"
          value={props.value}
          onInput={(e) => props.onValue(e.currentTarget.value)}
          data-testid={props.testId}
        />
      </label>
      <select
        class="unit-select"
        aria-label={props.unitLabel}
        value={props.unit}
        onChange={(e) => props.onUnit(e.currentTarget.value)}
      >
        {LENGTH_UNITS.map((u) => (
          <option key={u.id} value={u.id}>
            {u.label}
          </option>
        ))}
      </select>
    </div>
  );
}

function Saved({ message }: { message: string | null }) {
  return message ? (
    <p role="status" class={message.startsWith('Saved') ? 'save save--saved' : 'warning'} data-testid="task-message">
      {message}
    </p>
  ) : null;
}

function ValveChangeTask({ context, machine }: { context: MaintenanceContext; machine: Machine }) {
  const [cylinderId, setCylinderId] = useState<string | null>(null);
  const [positionId, setPositionId] = useState<string | null>(null);
  const [removed, setRemoved] = useState('');
  const [installed, setInstalled] = useState('');
  const [reason, setReason] = useState<'planned' | 'failure' | null>(null);
  const [asFound, setAsFound] = useState<string[]>([]);
  const [parts, setParts] = useState<string[]>([]);
  const [torque, setTorque] = useState('');
  const [torqueUnit, setTorqueUnit] = useState<'Nm' | 'ftlbf'>('Nm');
  const [runHours, setRunHours] = useState('');
  const [notes, setNotes] = useState('');
  const [photo, setPhoto] = useState<RecordPhoto | null>(null);
  const [photoProblem, setPhotoProblem] = useState<string | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const { ack, gate, banner, reset } = useGate(context);
  const cylinder = machine.cylinders.find((c) => c.id === cylinderId) ?? null;

  const save = async () => {
    if (!ack || !positionId || !reason) return;
    const torqueValue = torque.trim() === '' ? null : Number(torque.replace(',', '.'));
    if (torqueValue !== null && !(torqueValue > 0))
      return setMessage('Torque: enter a number above 0, or leave it empty.');
    const hoursValue = runHours.trim() === '' ? null : Number(runHours.replace(',', '.'));
    if (hoursValue !== null && !(hoursValue >= 0))
      return setMessage('Run-hour meter: enter the meter reading in hours, or leave it empty.');
    const record: ValveChange = {
      id: crypto.randomUUID(),
      machineId: machine.id,
      valvePositionId: positionId,
      at: new Date().toISOString(),
      by: context.person,
      reason,
      removedValveId: removed.trim(),
      installedValveId: installed.trim(),
      asFound: asFound as ValveChange['asFound'],
      partsFitted: parts as ValveChange['partsFitted'],
      ...(torqueValue === null
        ? {}
        : {
            capBoltTorque: {
              text: torque.trim(),
              unit: torqueUnit,
              valueNm: torqueUnit === 'Nm' ? torqueValue : torqueValue * NM_PER_FTLBF,
            },
          }),
      ...(hoursValue === null ? {} : { runHours: hoursValue }),
      ...(notes.trim() ? { notes: notes.trim() } : {}),
      ...(photo ? { photo } : {}),
      lockoutAckId: ack.id,
    };
    try {
      await saveMaintenance(context, 'valveChange', record);
      setMessage(
        `Saved: ${machine.name} ${positionId}, valve ${installed.trim()} fitted. It goes to the server with the next sync.`,
      );
      reset();
      setPositionId(null);
      setRemoved('');
      setInstalled('');
      setReason(null);
      setAsFound([]);
      setParts([]);
      setNotes('');
      setPhoto(null);
    } catch (error) {
      setMessage(`Not saved: ${describeStoreError(error)}`);
    }
  };

  const ready = ack !== null && positionId !== null && reason !== null && installed.trim() !== '';
  return (
    <section class="card" aria-labelledby="valve-heading">
      <h2 id="valve-heading">Valve change on {machine.name}</h2>
      <fieldset class="actions">
        <legend class="visually-hidden">Cylinder</legend>
        {machine.cylinders.map((c) => (
          <button
            type="button"
            key={c.id}
            class={`button ${c.id === cylinderId ? '' : 'button--quiet'}`}
            aria-pressed={c.id === cylinderId}
            onClick={() => {
              setCylinderId(c.id);
              setPositionId(null);
            }}
          >
            Cylinder {c.id}
          </button>
        ))}
      </fieldset>
      {cylinder ? (
        <CylinderDrawing
          cylinder={cylinder}
          positions={machine.valvePositions.filter((p) => p.cylinderId === cylinder.id)}
          selected={positionId}
          onSelect={setPositionId}
        />
      ) : null}
      {positionId ? (
        <>
          <p class="big">Position {positionId}</p>
          {banner('Changing a valve')}
          {gate(
            { kind: 'valveChange', machineId: machine.id, ref: positionId },
            `valve change at ${machine.name} ${positionId}`,
          )}
          <fieldset class="form" disabled={!ack}>
            <legend class="visually-hidden">Valve change details</legend>
            <label class="field">
              <span class="field__label">Valve removed (id or tag)</span>
              <input
                class="field__input"
                value={removed}
                onInput={(e) => setRemoved(e.currentTarget.value)}
                data-testid="valve-removed"
              />
            </label>
            <label class="field">
              <span class="field__label">Valve fitted (id or tag)</span>
              <input
                class="field__input"
                value={installed}
                onInput={(e) => setInstalled(e.currentTarget.value)}
                data-testid="valve-installed"
              />
            </label>
            <p class="field__label">Reason</p>
            <div class="actions">
              {(['planned', 'failure'] as const).map((r) => (
                <button
                  type="button"
                  key={r}
                  class={`button ${reason === r ? '' : 'button--quiet'}`}
                  aria-pressed={reason === r}
                  onClick={() => setReason(r)}
                  data-testid={`reason-${r}`}
                >
                  {r === 'planned' ? 'Planned change' : 'Failed (as found)'}
                </button>
              ))}
            </div>
            <Chips label="As found" options={AS_FOUND_WORDS} chosen={asFound} onChange={setAsFound} />
            <Chips label="Parts fitted" options={PARTS} chosen={parts} onChange={setParts} />
            <div class="number">
              <label class="field">
                <span class="field__label">Cap and cover bolt torque</span>
                <input
                  class="field__input number__input"
                  inputmode="decimal"
                  value={torque}
                  onInput={(e) => setTorque(e.currentTarget.value)}
                />
              </label>
              <select
                class="unit-select"
                aria-label="Torque unit"
                value={torqueUnit}
                onChange={(e) => setTorqueUnit(e.currentTarget.value as 'Nm' | 'ftlbf')}
              >
                <option value="Nm">N·m</option>
                <option value="ftlbf">ft·lbf</option>
              </select>
            </div>
            <label class="field">
              <span class="field__label">Run-hour meter, h</span>
              <input
                class="field__input number__input"
                inputmode="decimal"
                value={runHours}
                onInput={(e) => setRunHours(e.currentTarget.value)}
                data-testid="valve-hours"
              />
            </label>
            <label class="field">
              <span class="field__label">Notes</span>
              <textarea
                class="field__input field__input--text"
                rows={3}
                value={notes}
                onInput={(e) => setNotes(e.currentTarget.value)}
              />
            </label>
            <label class="field">
              <span class="field__label">Photo of what was found (optional)</span>
              <input
                class="field__input"
                type="file"
                accept="image/*"
                capture="environment"
                data-testid="valve-photo"
                onChange={async (e) => {
                  const file = e.currentTarget.files?.[0];
                  setPhotoProblem(null);
                  if (!file) return;
                  try {
                    setPhoto(await shrinkPhoto(file));
                  } catch (error) {
                    setPhoto(null);
                    setPhotoProblem(error instanceof Error ? error.message : String(error));
                  }
                }}
              />
            </label>
            {photoProblem ? <p class="warning">{photoProblem}</p> : null}
            {photo ? (
              <div class="photo">
                <img
                  src={photo.dataUrl}
                  alt={`What was found at ${positionId}, for this valve change`}
                  width={photo.widthPx}
                  height={photo.heightPx}
                  data-testid="valve-photo-preview"
                />
                <button type="button" class="button button--quiet" onClick={() => setPhoto(null)}>
                  Remove the photo
                </button>
              </div>
            ) : null}
            <button type="button" class="button" disabled={!ready} onClick={() => void save()} data-testid="valve-save">
              Save the valve change
            </button>
          </fieldset>
        </>
      ) : null}
      <Saved message={message} />
    </section>
  );
}

function BearingTask({ context, machine }: { context: MaintenanceContext; machine: Machine }) {
  const [bearingId, setBearingId] = useState<string | null>(null);
  const [method, setMethod] = useState<BearingClearanceRecord['method'] | null>(null);
  const [where, setWhere] = useState<BearingClearanceRecord['measurements'][number]['where']>('top');
  const [value, setValue] = useState('');
  const [unit, setUnit] = useState<string>('mm');
  const [notes, setNotes] = useState('');
  const [message, setMessage] = useState<string | null>(null);
  const { ack, gate, banner, reset } = useGate(context);
  const bearing = machine.bearings.find((b) => b.id === bearingId) ?? null;
  const kindName = { main: 'Main', crankpin: 'Crankpin', crossheadPin: 'Crosshead pin' } as const;
  const parsed = value.trim() === '' ? null : lengthM(value, unit);
  const result = useMemo(() => {
    if (!bearing?.journalDiameterM || !parsed || 'error' in parsed) return null;
    try {
      return bearingClearance({
        measuredM: parsed.value,
        journalDiameterM: bearing.journalDiameterM,
        ...(bearing.clearance ? { specMinM: bearing.clearance.specMinM, specMaxM: bearing.clearance.specMaxM } : {}),
        ...(bearing.clearance?.wearLimitM === undefined ? {} : { wearLimitM: bearing.clearance.wearLimitM }),
      });
    } catch (error) {
      return { error: error instanceof CalcError ? error.message : String(error) };
    }
  }, [bearing, parsed && 'value' in parsed ? parsed.value : null]);

  const save = async () => {
    if (!ack || !bearing || !method || !result || 'error' in result || !parsed || 'error' in parsed) return;
    const record: BearingClearanceRecord = {
      id: crypto.randomUUID(),
      machineId: machine.id,
      bearingId: bearing.id,
      at: new Date().toISOString(),
      by: context.person,
      method,
      measurements: [{ where, entered: { text: value.trim(), unit: unit as 'mm' }, valueM: parsed.value }],
      spec: {
        ...(bearing.clearance ? { minM: bearing.clearance.specMinM, maxM: bearing.clearance.specMaxM } : {}),
        ...(bearing.clearance?.wearLimitM === undefined ? {} : { wearLimitM: bearing.clearance.wearLimitM }),
      },
      result: { status: result.status, perDiameter: result.perDiameter, message: result.message },
      ...(notes.trim() ? { notes: notes.trim() } : {}),
      lockoutAckId: ack.id,
    };
    try {
      await saveMaintenance(context, 'bearingClearance', record);
      setMessage(`Saved: ${machine.name} ${bearing.id}, ${result.message}`);
      reset();
      setValue('');
      setNotes('');
    } catch (error) {
      setMessage(`Not saved: ${describeStoreError(error)}`);
    }
  };

  const mm = (m: number) => `${(m * 1000).toFixed(3)} mm`;
  return (
    <section class="card" aria-labelledby="bearing-heading">
      <h2 id="bearing-heading">Bearing clearance on {machine.name}</h2>
      <fieldset class="actions">
        <legend class="visually-hidden">Bearing</legend>
        {machine.bearings.map((b) => (
          <button
            type="button"
            key={b.id}
            class={`button ${b.id === bearingId ? '' : 'button--quiet'}`}
            aria-pressed={b.id === bearingId}
            onClick={() => setBearingId(b.id)}
            data-testid={`bearing-${b.id}`}
          >
            {kindName[b.kind]} {b.index}
          </button>
        ))}
      </fieldset>
      {bearing ? (
        <>
          <p>
            {bearing.journalDiameterM
              ? `Journal ${mm(bearing.journalDiameterM)}. `
              : 'No journal diameter in the configuration. '}
            {bearing.clearance
              ? `Maker's clearance ${mm(bearing.clearance.specMinM)} to ${mm(bearing.clearance.specMaxM)}${bearing.clearance.wearLimitM ? `, wear limit ${mm(bearing.clearance.wearLimitM)}` : ''}.`
              : 'No maker’s clearance range in the configuration.'}
          </p>
          {banner('Measuring a bearing')}
          {gate(
            { kind: 'bearingClearance', machineId: machine.id, ref: bearing.id },
            `clearance of ${machine.name} ${bearing.id}`,
          )}
          <fieldset class="form" disabled={!ack}>
            <legend class="visually-hidden">Clearance measurement</legend>
            <p class="field__label">Method</p>
            <div class="actions">
              {(
                [
                  ['liftCheck', 'Lift check'],
                  ['feeler', 'Feeler gauges'],
                  ['plastigage', 'Plastigage'],
                  ['micrometers', 'Micrometers'],
                ] as const
              ).map(([id, label]) => (
                <button
                  type="button"
                  key={id}
                  class={`button ${method === id ? '' : 'button--quiet'}`}
                  aria-pressed={method === id}
                  onClick={() => setMethod(id)}
                  data-testid={`method-${id}`}
                >
                  {label}
                </button>
              ))}
            </div>
            <label class="field">
              <span class="field__label">Where it was measured</span>
              <select
                class="unit-select"
                value={where}
                onChange={(e) => setWhere(e.currentTarget.value as typeof where)}
              >
                {['top', 'left', 'right', 'bottom', 'average'].map((w) => (
                  <option key={w} value={w}>
                    {w}
                  </option>
                ))}
              </select>
            </label>
            <LengthField
              label="Measured diametral clearance"
              unitLabel="Clearance unit"
              testId="clearance-value"
              value={value}
              unit={unit}
              onValue={setValue}
              onUnit={setUnit}
            />
            {parsed && 'error' in parsed ? <p class="warning">{parsed.error}</p> : null}
            {result ? (
              'error' in result ? (
                <p class="warning">{result.error}</p>
              ) : (
                <p
                  class={`finding finding--${result.status}`}
                  data-testid="clearance-result"
                  data-severity={result.status}
                >
                  {result.message}
                </p>
              )
            ) : null}
            <label class="field">
              <span class="field__label">Notes (cap torque, shims, part temperature)</span>
              <textarea
                class="field__input field__input--text"
                rows={3}
                value={notes}
                onInput={(e) => setNotes(e.currentTarget.value)}
              />
            </label>
            <button
              type="button"
              class="button"
              disabled={!ack || !method || !result || 'error' in result}
              onClick={() => void save()}
              data-testid="clearance-save"
            >
              Save the clearance check
            </button>
          </fieldset>
        </>
      ) : null}
      <Saved message={message} />
    </section>
  );
}

function RodDropTask({ context, machine }: { context: MaintenanceContext; machine: Machine }) {
  const cylinders = machine.cylinders.filter((c) => c.rodDrop);
  const [cylinderId, setCylinderId] = useState<string | null>(null);
  const [value, setValue] = useState('');
  const [unit, setUnit] = useState<string>('mm');
  const [message, setMessage] = useState<string | null>(null);
  const { ack, gate, banner, reset } = useGate(context);
  const cylinder = cylinders.find((c) => c.id === cylinderId) ?? null;
  const parsed = value.trim() === '' ? null : lengthM(value, unit);
  let wear: ReturnType<typeof riderBandWear> | { error: string } | null = null;
  if (cylinder?.rodDrop && parsed && 'value' in parsed) {
    try {
      wear = riderBandWear({
        rodDropChangeM: parsed.value - cylinder.rodDrop.newBandReadingM,
        riderToPinM: cylinder.rodDrop.riderToPinM,
        probeToPinM: cylinder.rodDrop.probeToPinM,
        allowableWearM: cylinder.rodDrop.allowableWearM,
      });
    } catch (error) {
      wear = { error: error instanceof CalcError ? error.message : String(error) };
    }
  }
  const save = async () => {
    if (!ack || !cylinder?.rodDrop || !parsed || 'error' in parsed || !wear || 'error' in wear) return;
    const record: RodDropRecord = {
      id: crypto.randomUUID(),
      machineId: machine.id,
      cylinderId: cylinder.id,
      at: new Date().toISOString(),
      by: context.person,
      entered: { text: value.trim(), unit: unit as 'mm' },
      readingM: parsed.value,
      newBandReadingM: cylinder.rodDrop.newBandReadingM,
      wearM: wear.wearM,
      usedFraction: wear.usedFraction,
    };
    try {
      await saveMaintenance(context, 'rodDrop', record);
      setMessage(`Saved: ${machine.name} ${cylinder.id}, ${wear.message}`);
      reset();
      setValue('');
    } catch (error) {
      setMessage(`Not saved: ${describeStoreError(error)}`);
    }
  };
  if (cylinders.length === 0)
    return <p class="card">No cylinder of {machine.name} has rod-drop data in the configuration.</p>;
  return (
    <section class="card" aria-labelledby="rod-heading">
      <h2 id="rod-heading">Rod drop on {machine.name}</h2>
      <fieldset class="actions">
        <legend class="visually-hidden">Cylinder</legend>
        {cylinders.map((c) => (
          <button
            type="button"
            key={c.id}
            class={`button ${c.id === cylinderId ? '' : 'button--quiet'}`}
            aria-pressed={c.id === cylinderId}
            onClick={() => setCylinderId(c.id)}
          >
            Cylinder {c.id} (throw {c.throw})
          </button>
        ))}
      </fieldset>
      {cylinder?.rodDrop ? (
        <>
          <p>
            Reading with new bands {(cylinder.rodDrop.newBandReadingM * 1000).toFixed(3)} mm; allowable wear{' '}
            {(cylinder.rodDrop.allowableWearM * 1000).toFixed(2)} mm.
          </p>
          {banner('Reading rod drop at the packing')}
          {gate(
            { kind: 'rodDrop', machineId: machine.id, ref: cylinder.id },
            `rod drop of ${machine.name} ${cylinder.id}`,
          )}
          <fieldset class="form" disabled={!ack}>
            <legend class="visually-hidden">Rod drop reading</legend>
            <LengthField
              label="Rod-drop reading"
              unitLabel="Rod drop unit"
              testId="rod-value"
              value={value}
              unit={unit}
              onValue={setValue}
              onUnit={setUnit}
            />
            {wear ? (
              'error' in wear ? (
                <p class="warning">{wear.error}</p>
              ) : (
                <p class={`finding finding--${wear.status}`} data-testid="rod-result">
                  {wear.message}
                </p>
              )
            ) : null}
            <button
              type="button"
              class="button"
              disabled={!ack || !wear || 'error' in wear}
              onClick={() => void save()}
              data-testid="rod-save"
            >
              Save the rod-drop reading
            </button>
          </fieldset>
        </>
      ) : null}
      <Saved message={message} />
    </section>
  );
}

function History({ context, machine }: { context: MaintenanceContext; machine: Machine }) {
  const [changes, setChanges] = useState<ValveChange[] | null>(null);
  useEffect(() => {
    void context.store.listRecords('valveChange').then(setChanges);
  }, [context]);
  const histories = useMemo(
    () => (changes ? positionHistories(machine, changes, new Date().toISOString()) : []),
    [changes, machine],
  );
  const ranked = rankPositions(histories);
  if (!changes) return <p class="loading">Loading…</p>;
  return (
    <section class="card" aria-labelledby="history-heading" data-testid="valve-history">
      <h2 id="history-heading">Valve positions of {machine.name}</h2>
      {ranked.length === 0 ? (
        <p>No valve changes recorded on this tablet for {machine.name}.</p>
      ) : (
        <>
          <ValveLifeTable
            rows={ranked}
            caption="Positions with changes, the ones that eat valves first"
            rowTestId={(h) => `history-${h.positionId}`}
          />
          {ranked.map((h) => (
            <div key={h.positionId} class="panel__block">
              <h3>
                {h.positionId} ({h.end} end {h.service};{' '}
                {h.life?.basis === 'run-hours' ? 'run-hour meter' : 'calendar hours'})
              </h3>
              {h.problem ? <p class="warning">{h.problem}</p> : null}
              <table class="table" data-testid={`changes-${h.positionId}`}>
                <caption class="visually-hidden">Changes at {h.positionId}</caption>
                <thead>
                  <tr>
                    <th scope="col">Date</th>
                    <th scope="col">Reason</th>
                    <th scope="col">Interval</th>
                    <th scope="col">As found</th>
                    <th scope="col">Valve fitted</th>
                  </tr>
                </thead>
                <tbody>
                  {h.changes.map((change) => (
                    <tr key={change.id}>
                      <td>{day(change.at)}</td>
                      <td>{change.reason}</td>
                      <td data-testid={`interval-${change.id}`}>{hours(change.intervalH)}</td>
                      <td>{change.asFound.join(', ') || '–'}</td>
                      <td>{change.installedValveId}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          ))}
        </>
      )}
    </section>
  );
}
