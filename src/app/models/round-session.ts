/**
 * One round being walked (or looked at once finished): its configuration and route, the readings committed to the
 * store, what is being typed and saved, the lockout acknowledgements, and the findings of the checks engine.
 * Screens render it; every change goes through the store and shows as saved only after the commit.
 */
import { barometerOf, evaluateRound } from '../../checks';
import type { CheckPoint, Finding, LockoutAck, PersonRef, Reading, Round, Route, SiteConfig } from '../../schema';
import type { Store } from '../../store';
import { describeStoreError } from './data';
import { type Observable, observable } from './observable';
import { currentPerson } from './person';
import { convertText, findingsForPoint, isNumeric, notesStillNeeded, parseEntry } from './round-entry';

export type SaveState =
  | { kind: 'idle' }
  | { kind: 'saving' }
  | { kind: 'saved' }
  | { kind: 'invalid'; message: string }
  | { kind: 'error'; message: string };

export interface PointDraft {
  /** What is in the field now (may not be saved yet). */
  text: string;
  unit: string | null;
  note: string;
  save: SaveState;
}

/** How many earlier finished rounds feed "rise since last round" and trends. */
export const HISTORY_ROUNDS = 20;
const UNIT_OVERRIDES_KEY = 'unitOverrides';

export class RoundSession {
  readonly changed: Observable<number>;
  private readonly version = observable(0);
  readonly barometricPa: number;
  readonly readings = new Map<string, Reading>();
  readonly drafts = new Map<string, PointDraft>();
  readonly acks = new Map<string, LockoutAck>();
  findings: Finding[] = [];
  private readonly latestSave = new Map<string, number>();
  private saveCounter = 0;
  private unitOverrides: Record<string, string> = {};
  /** Per point, a number that changes whenever what its card shows changes (so unchanged cards are not redrawn). */
  private readonly pointVersions = new Map<string, number>();
  private findingSignatures = new Map<string, string>();
  private epoch = 0;

  private constructor(
    readonly store: Store,
    readonly config: SiteConfig,
    readonly route: Route,
    public round: Round,
    readonly person: PersonRef,
    readonly deviceId: string,
    private readonly history: { readings: Reading[] },
  ) {
    this.changed = this.version;
    this.barometricPa = barometerOf(config);
  }

  /** Loads a round with everything it needs. Throws with a plain message when something is missing. */
  static async open(store: Store, roundId: string): Promise<RoundSession> {
    const round = await store.getRound(roundId);
    if (!round) throw new Error('This round is not on this tablet.');
    const config = await store.getConfig(round.configVersion);
    if (!config)
      throw new Error(`The site configuration version ${round.configVersion} of this round is not on this tablet.`);
    const route = config.routes.find((r) => r.id === round.routeId);
    if (!route) throw new Error(`The route ${round.routeId} is not in configuration version ${round.configVersion}.`);
    const person = (await currentPerson(store)) ?? round.by;
    const finished = (await store.listRounds({ state: 'finished' }))
      .filter((r) => r.id !== round.id && r.startedAt < round.startedAt)
      .slice(0, HISTORY_ROUNDS);
    const historyReadings = (await Promise.all(finished.map((r) => store.readingsOf(r.id)))).flat();
    const session = new RoundSession(store, config, route, round, person, await store.deviceId(), {
      readings: historyReadings,
    });
    const overrides = await store.getMeta(UNIT_OVERRIDES_KEY);
    if (overrides && typeof overrides === 'object')
      session.unitOverrides = { ...(overrides as Record<string, string>) };
    for (const reading of await store.readingsOf(round.id)) session.readings.set(reading.pointId, reading);
    for (const ack of await store.listRecords('lockoutAck')) {
      if (ack.task.roundId === round.id && ack.task.ref) session.acks.set(ack.task.ref, ack);
    }
    session.setFindings(round.state === 'finished' ? await store.findingsOf(round.id) : session.evaluate());
    return session;
  }

  get finished(): boolean {
    return this.round.state === 'finished';
  }

  private readonly pointListeners = new Map<string, Set<() => void>>();
  private readonly dirtyPoints = new Set<string>();

  /**
   * Tells the cards of changed points, and (unless `summary` is false) the whole screen, to draw again. A save in
   * progress changes only its own card, so typing does not redraw the route.
   */
  private emit(summary = true): void {
    const dirty = [...this.dirtyPoints];
    this.dirtyPoints.clear();
    for (const pointId of dirty) for (const listener of this.pointListeners.get(pointId) ?? []) listener();
    if (summary) this.version.set(this.version.get() + 1);
  }

  /** Calls `listener` whenever the card of this point must be drawn again. */
  subscribePoint(pointId: string, listener: () => void): () => void {
    const set = this.pointListeners.get(pointId) ?? new Set();
    set.add(listener);
    this.pointListeners.set(pointId, set);
    return () => set.delete(listener);
  }

  private touch(pointId: string): void {
    this.pointVersions.set(pointId, (this.pointVersions.get(pointId) ?? 0) + 1);
    this.dirtyPoints.add(pointId);
  }

  /** Changes when the card of this point must be drawn again. */
  versionOf(pointId: string): string {
    return `${this.epoch}:${this.pointVersions.get(pointId) ?? 0}`;
  }

  private evaluate(): Finding[] {
    return evaluateRound(this.config, [...this.readings.values()], this.history);
  }

  /** Sets the findings and marks the cards whose findings changed. */
  private setFindings(findings: Finding[]): void {
    this.findings = findings;
    const next = new Map<string, string>();
    for (const point of this.route.points) {
      const signature = findingsForPoint(point, findings)
        .map((finding) => `${finding.key}|${finding.severity}|${finding.message}`)
        .join('\n');
      next.set(point.id, signature);
      if (signature !== (this.findingSignatures.get(point.id) ?? '')) this.touch(point.id);
    }
    this.findingSignatures = next;
  }

  private setDraft(pointId: string, draft: PointDraft): void {
    this.drafts.set(pointId, draft);
    this.touch(pointId);
  }

  /** The unit a point is entered in: remembered override, else the gauge unit of the configuration. */
  unitFor(point: CheckPoint): string | null {
    return (
      this.drafts.get(point.id)?.unit ??
      this.readings.get(point.id)?.entered?.unit ??
      this.unitOverrides[point.id] ??
      point.unit ??
      null
    );
  }

  draftFor(point: CheckPoint): PointDraft {
    const existing = this.drafts.get(point.id);
    if (existing) return existing;
    const reading = this.readings.get(point.id);
    return {
      text: reading?.entered?.text ?? '',
      unit: this.unitFor(point),
      note: reading?.note ?? '',
      save: reading ? { kind: 'saved' } : { kind: 'idle' },
    };
  }

  /** True while anything typed is not yet committed: an update must not reload the page now. */
  hasUnsavedInput(): boolean {
    for (const draft of this.drafts.values()) {
      if (draft.save.kind === 'saving' || draft.save.kind === 'invalid' || draft.save.kind === 'error') return true;
    }
    return false;
  }

  needsLockout(point: CheckPoint): boolean {
    return point.lockout !== undefined && !this.acks.has(point.id);
  }

  /** A value (or answer) typed or tapped: parsed, then saved at once. */
  enter(point: CheckPoint, text: string, unit: string | null = this.unitFor(point)): Promise<void> {
    const draft = { ...this.draftFor(point), text, unit };
    if (this.finished) return Promise.resolve();
    if (this.needsLockout(point)) {
      this.setDraft(point.id, {
        ...draft,
        save: { kind: 'invalid', message: 'Acknowledge the cautions before this step.' },
      });
      this.emit();
      return Promise.resolve();
    }
    const parsed = parseEntry(point, text, unit, this.barometricPa);
    if (!parsed.ok) {
      this.setDraft(point.id, { ...draft, save: { kind: 'invalid', message: parsed.message } });
      this.emit();
      return Promise.resolve();
    }
    const reading: Reading = {
      id: this.readings.get(point.id)?.id ?? crypto.randomUUID(),
      roundId: this.round.id,
      pointId: point.id,
      at: new Date().toISOString(),
      entered: parsed.entered,
      valueSI: parsed.valueSI,
      ...(draft.note.trim() ? { note: draft.note } : {}),
    };
    return this.save(point, draft, reading);
  }

  /** A note on a point: saved with its reading (kept as typed until the point has a value). */
  async setNote(point: CheckPoint, note: string): Promise<void> {
    const draft = { ...this.draftFor(point), note };
    const reading = this.readings.get(point.id);
    if (this.finished) return;
    if (!reading) {
      this.setDraft(point.id, draft);
      this.emit();
      return;
    }
    const { note: _old, ...rest } = reading;
    await this.save(point, draft, { ...rest, at: reading.at, ...(note.trim() ? { note } : {}) });
  }

  /** Skips a point with a reason; any value typed so far is dropped. */
  skip(point: CheckPoint, reason: string): Promise<void> {
    if (this.finished) return Promise.resolve();
    const draft = { ...this.draftFor(point), text: '' };
    const reading: Reading = {
      id: this.readings.get(point.id)?.id ?? crypto.randomUUID(),
      roundId: this.round.id,
      pointId: point.id,
      at: new Date().toISOString(),
      entered: null,
      valueSI: null,
      skipped: { reason: reason.trim() || 'No reason given' },
      ...(draft.note.trim() ? { note: draft.note } : {}),
    };
    return this.save(point, draft, reading);
  }

  /** Unit switched: remembered for this point on this tablet; a typed value is converted, not re-read. */
  async switchUnit(point: CheckPoint, unit: string): Promise<void> {
    this.unitOverrides[point.id] = unit;
    await this.store.setMeta(UNIT_OVERRIDES_KEY, this.unitOverrides);
    const draft = this.draftFor(point);
    this.setDraft(point.id, { ...draft, unit, text: draft.text });
    const reading = this.readings.get(point.id);
    if (reading?.valueSI !== null && reading?.valueSI !== undefined && isNumeric(point) && !this.finished) {
      await this.enter(point, convertText(reading.valueSI, unit, this.barometricPa), unit);
    } else {
      this.emit();
    }
  }

  private async save(point: CheckPoint, draft: PointDraft, reading: Reading): Promise<void> {
    const token = ++this.saveCounter;
    this.latestSave.set(point.id, token);
    this.setDraft(point.id, { ...draft, save: { kind: 'saving' } });
    this.emit(false);
    try {
      await this.store.saveReading(reading);
      if (this.latestSave.get(point.id) !== token) return; // a later save of this point follows
      this.readings.set(point.id, reading);
      this.setDraft(point.id, { ...draft, save: { kind: 'saved' } });
      // "Saved" shows as soon as the commit is done; the checks follow once the browser has drawn it.
      this.emit();
      await new Promise((resolve) => setTimeout(resolve, 0));
      if (this.latestSave.get(point.id) !== token) return;
      this.setFindings(this.evaluate());
    } catch (error) {
      if (this.latestSave.get(point.id) !== token) return;
      this.setDraft(point.id, {
        ...draft,
        save: { kind: 'error', message: `Not saved: ${describeStoreError(error)}` },
      });
    }
    this.emit();
  }

  /** Records the acknowledged cautions for a lockout-related point; only then may it be entered. */
  async acknowledgeLockout(
    point: CheckPoint,
    acknowledgements: Array<{ cautionId: string; at: string }>,
  ): Promise<void> {
    if (!point.lockout) return;
    const ack: LockoutAck = {
      id: crypto.randomUUID(),
      task: { kind: 'checkPoint', machineId: point.machineId, ref: point.id, roundId: this.round.id },
      cautionSetId: point.lockout.cautionSetId,
      configVersion: this.config.version,
      by: this.person,
      acknowledgements,
      completedAt: new Date().toISOString(),
    };
    await this.store.saveRecord('lockoutAck', ack, {
      author: this.person.id,
      device: this.deviceId,
      createdAt: ack.completedAt,
    });
    this.acks.set(point.id, ack);
    this.touch(point.id);
    this.emit();
  }

  notesNeeded() {
    return notesStillNeeded(this.findings, this.readings, this.config);
  }

  unread(): CheckPoint[] {
    return this.route.points.filter((point) => !this.readings.has(point.id));
  }

  /**
   * Finishes the round: unread points are recorded as not read, findings are evaluated once more, and the round,
   * its readings and findings are frozen and queued for the server in one transaction.
   */
  async finish(): Promise<void> {
    if (this.finished) return;
    if (this.hasUnsavedInput()) throw new Error('Some entries are not saved yet: correct or clear them first.');
    if (this.notesNeeded().length) throw new Error('Every alarm or trip needs a note before the round is finished.');
    for (const point of this.unread()) await this.skip(point, 'Not read on this round');
    const findings = this.evaluate();
    const finishedAt = new Date().toISOString();
    await this.store.finishRound({
      roundId: this.round.id,
      finishedAt,
      findings,
      meta: { author: this.person.id, device: this.deviceId, createdAt: finishedAt },
    });
    this.round = { ...this.round, state: 'finished', finishedAt };
    this.epoch += 1;
    this.setFindings(findings);
    this.emit();
  }

  /** A note on a finished round: the only way to add to or correct it. */
  async addNote(text: string, readingId?: string): Promise<void> {
    const note = {
      id: crypto.randomUUID(),
      roundId: this.round.id,
      ...(readingId ? { readingId } : {}),
      by: this.person,
      at: new Date().toISOString(),
      text,
    };
    await this.store.saveRecord('note', note, { author: this.person.id, device: this.deviceId, createdAt: note.at });
    this.emit();
  }
}
