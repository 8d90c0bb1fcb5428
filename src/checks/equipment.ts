/** Per cylinder: valve cover differentials. Per bearing: temperature against limits, oil, previous round, peers. */
import { assessBearingTemperature, assessValveCovers, type ValveCoverReading } from '../calc';
import type { Finding } from '../schema';
import { findReading, inputFinding, makeFinding, type RoundContext } from './context';

export function valveCoverFindings(ctx: RoundContext): Finding[] {
  const findings: Finding[] = [];
  for (const machine of ctx.config.machines) {
    for (const cylinder of machine.cylinders) {
      const covers: Array<ValveCoverReading & { pointId: string }> = [];
      for (const [pointId, reading] of ctx.readings) {
        const point = ctx.points.get(pointId);
        if (point?.kind !== 'valveCoverTemperature' || point.machineId !== machine.id || reading.valueSI === null)
          continue;
        const position = machine.valvePositions.find((p) => p.id === point.valvePositionId);
        if (!position || position.cylinderId !== cylinder.id) continue;
        covers.push({
          id: position.id,
          end: position.end,
          service: position.service,
          temperatureK: reading.valueSI,
          pointId,
        });
      }
      if (covers.length === 0) continue;
      const gasAt = (role: 'suctionTemperature' | 'dischargeTemperature') =>
        (role === 'dischargeTemperature'
          ? findReading(ctx, (p) => p.machineId === machine.id && p.cylinderId === cylinder.id && p.role === role)
          : null) ??
        findReading(
          ctx,
          (p) =>
            p.machineId === machine.id &&
            p.stageId === cylinder.stageId &&
            p.role === role &&
            p.cylinderId === undefined,
        );
      const suction = gasAt('suctionTemperature');
      const discharge = gasAt('dischargeTemperature');
      const subject = { machineId: machine.id, stageId: cylinder.stageId, cylinderId: cylinder.id };
      try {
        const result = assessValveCovers({
          covers: covers.map(({ pointId: _p, ...cover }) => cover),
          ...(suction ? { suctionGasK: suction.value } : {}),
          ...(discharge ? { dischargeGasK: discharge.value } : {}),
        });
        const numbers: Finding['numbers'] = {};
        for (const cover of result.covers) {
          numbers[`${cover.id}.peerDeltaK`] = cover.peerDeltaK;
          numbers[`${cover.id}.gasDeltaK`] = cover.gasDeltaK;
        }
        const worst = result.covers.find((cover) => cover.suspect !== null && cover.status === result.status);
        findings.push(
          makeFinding(
            ctx,
            'valveCovers',
            worst ? { ...subject, valvePositionId: worst.id } : subject,
            result.status,
            `${machine.name} cylinder ${cylinder.id}: ${result.message}`,
            numbers,
            {
              covers: result.covers.map((cover) => ({ id: cover.id, status: cover.status, suspect: cover.suspect })),
              suctionGasK: suction?.value ?? null,
              dischargeGasK: discharge?.value ?? null,
            },
          ),
        );
      } catch (error) {
        findings.push(inputFinding(ctx, subject, `the valve covers of ${cylinder.id}`, error));
      }
    }
  }
  return findings;
}

export function bearingFindings(ctx: RoundContext): Finding[] {
  const findings: Finding[] = [];
  for (const machine of ctx.config.machines) {
    const oil = findReading(ctx, (p) => p.machineId === machine.id && p.role === 'oilSupplyTemperature');
    const bearingReadings = [...ctx.readings].flatMap(([pointId, reading]) => {
      const point = ctx.points.get(pointId);
      const bearing = machine.bearings.find((b) => b.id === point?.bearingId);
      if (
        point?.kind !== 'bearingTemperature' ||
        point.machineId !== machine.id ||
        !bearing ||
        reading.valueSI === null
      )
        return [];
      return [{ point, reading, bearing, value: reading.valueSI }];
    });
    for (const entry of bearingReadings) {
      const subject = { machineId: machine.id, bearingId: entry.bearing.id, pointId: entry.point.id };
      const now = Date.parse(entry.reading.at);
      const previous = [...(ctx.history.get(entry.point.id) ?? [])].reverse().find((past) => past.ms < now)?.reading;
      const peers =
        entry.bearing.kind === 'main'
          ? bearingReadings
              .filter((other) => other !== entry && other.bearing.kind === 'main')
              .map((other) => other.value)
          : [];
      try {
        const result = assessBearingTemperature({
          temperatureK: entry.value,
          ...(oil ? { oilSupplyK: oil.value } : {}),
          ...(previous && previous.valueSI !== null
            ? { previous: { temperatureK: previous.valueSI, at: previous.at } }
            : {}),
          at: entry.reading.at,
          ...(peers.length ? { peersK: peers } : {}),
          limits: entry.bearing.limits,
        });
        findings.push(
          makeFinding(
            ctx,
            'bearingTemperature',
            subject,
            result.status,
            `${machine.name} ${entry.point.label}: ${result.message}`,
            {
              temperatureK: entry.value,
              riseOverOilK: result.riseOverOilK,
              riseSincePreviousK: result.riseSincePreviousK,
              rateKPerH: result.rateKPerH,
              peerDeltaK: result.peerDeltaK,
            },
            {
              oilSupplyK: oil?.value ?? null,
              previousK: previous?.valueSI ?? null,
              previousAt: previous?.at ?? null,
              limits: entry.bearing.limits,
              warnings: result.warnings,
            },
          ),
        );
      } catch (error) {
        findings.push(inputFinding(ctx, subject, `${entry.point.label}`, error));
      }
    }
  }
  return findings;
}
