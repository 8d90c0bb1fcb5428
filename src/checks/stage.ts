/**
 * Per stage and per cylinder: predicted against observed discharge temperature, VE, capacity and power, and the
 * rod load and reversal of each throw, all from the stage's pressure and temperature readings.
 */
import {
  assessDischargeTemperature,
  dischargeTemperature,
  gasProperties,
  rodLoad,
  type StageInput,
  stagePerformance,
} from '../calc';
import type { Cylinder, Finding, Machine, Stage } from '../schema';
import { display, findReading, inputFinding, makeFinding, memoised, type RoundContext } from './context';

/** The input of calc's stage functions for one cylinder of a stage at one operating state. */
export function cylinderStageInput(
  machine: Machine,
  stage: Stage,
  cylinder: Cylinder,
  state: { suctionPressurePa: number; dischargePressurePa: number; suctionTemperatureK: number },
  composition: Record<string, number>,
  standardBasis: StageInput['standardBasis'],
): StageInput {
  return {
    boreM: cylinder.boreM,
    rodM: cylinder.rodM,
    ...(cylinder.tailRodM === undefined ? {} : { tailRodM: cylinder.tailRodM }),
    strokeM: machine.frame.strokeM,
    speedRpm: machine.frame.ratedSpeedRpm,
    headClearance: cylinder.headClearance,
    crankClearance: cylinder.crankClearance,
    headActive: cylinder.headActive,
    crankActive: cylinder.crankActive,
    suctionPressurePa: state.suctionPressurePa,
    dischargePressurePa: state.dischargePressurePa,
    suctionTemperatureK: state.suctionTemperatureK,
    composition,
    ...(cylinder.polytropicExponent === undefined ? {} : { polytropicExponent: cylinder.polytropicExponent }),
    ...(cylinder.zSuction === undefined ? {} : { zSuction: cylinder.zSuction }),
    ...(cylinder.zDischarge === undefined ? {} : { zDischarge: cylinder.zDischarge }),
    veMethod: stage.veMethod,
    ...(stage.veConstant === undefined ? {} : { veConstant: stage.veConstant }),
    ...(stage.compressionEfficiency === undefined ? {} : { compressionEfficiency: stage.compressionEfficiency }),
    ...(stage.mechanicalEfficiency === undefined ? {} : { mechanicalEfficiency: stage.mechanicalEfficiency }),
    ...(standardBasis === undefined ? {} : { standardBasis }),
  };
}

interface StageReadings {
  suctionPressurePa: number;
  dischargePressurePa: number;
  suctionTemperatureK: number | null;
  dischargeTemperatureK: number | null;
  dischargeUnit: string | null;
}

function stageReadings(ctx: RoundContext, machine: Machine, stage: Stage): StageReadings | null {
  const on = (role: string) => (point: { machineId: string; stageId?: string; role: string; cylinderId?: string }) =>
    point.machineId === machine.id &&
    point.stageId === stage.id &&
    point.role === role &&
    point.cylinderId === undefined;
  const ps = findReading(ctx, on('suctionPressure'));
  const pd = findReading(ctx, on('dischargePressure'));
  if (!ps || !pd) return null;
  const ts = findReading(ctx, on('suctionTemperature'));
  const td = findReading(ctx, on('dischargeTemperature'));
  return {
    suctionPressurePa: ps.value,
    dischargePressurePa: pd.value,
    suctionTemperatureK: ts?.value ?? null,
    dischargeTemperatureK: td?.value ?? null,
    dischargeUnit: td?.reading.entered?.unit ?? td?.point.unit ?? null,
  };
}

/** The cylinder's own discharge temperature point, if it has one. */
function cylinderDischarge(ctx: RoundContext, machine: Machine, cylinder: Cylinder) {
  return findReading(
    ctx,
    (point) =>
      point.machineId === machine.id && point.cylinderId === cylinder.id && point.role === 'dischargeTemperature',
  );
}

export function stageFindings(ctx: RoundContext): Finding[] {
  const findings: Finding[] = [];
  for (const machine of ctx.config.machines) {
    for (const stage of machine.stages) {
      const readings = stageReadings(ctx, machine, stage);
      if (!readings) continue;
      const gas = ctx.config.gasStreams.find((stream) => stream.id === stage.gasStreamId);
      if (!gas) continue;
      const cylinders = machine.cylinders.filter((cylinder) => cylinder.stageId === stage.id);
      const stageSubject = { machineId: machine.id, stageId: stage.id };
      findings.push(...dischargeFindings(ctx, machine, stage, cylinders, readings, gas.composition));
      if (readings.suctionTemperatureK !== null) {
        findings.push(
          performanceFinding(
            ctx,
            machine,
            stage,
            cylinders,
            readings,
            gas.composition,
            gas.standardBasis,
            stageSubject,
          ),
        );
      }
      for (const cylinder of cylinders)
        findings.push(rodLoadFinding(ctx, machine, stage, cylinder, readings, gas.composition));
    }
  }
  return findings;
}

function dischargeFindings(
  ctx: RoundContext,
  machine: Machine,
  stage: Stage,
  cylinders: Cylinder[],
  readings: StageReadings,
  composition: Record<string, number>,
): Finding[] {
  if (readings.suctionTemperatureK === null) return [];
  const suctionTemperatureK = readings.suctionTemperatureK;
  // Each cylinder with its own thermometer is judged on its own; otherwise the stage header reading is judged.
  const targets: Array<{
    subject: Finding['subject'];
    observed: number;
    unit: string | null;
    exponent?: number;
    label: string;
  }> = [];
  for (const cylinder of cylinders) {
    const own = cylinderDischarge(ctx, machine, cylinder);
    if (own) {
      targets.push({
        subject: { machineId: machine.id, stageId: stage.id, cylinderId: cylinder.id },
        observed: own.value,
        unit: own.reading.entered?.unit ?? own.point.unit ?? null,
        ...(cylinder.polytropicExponent === undefined ? {} : { exponent: cylinder.polytropicExponent }),
        label: `${machine.name} cylinder ${cylinder.id}`,
      });
    }
  }
  if (targets.length === 0 && readings.dischargeTemperatureK !== null) {
    targets.push({
      subject: { machineId: machine.id, stageId: stage.id },
      observed: readings.dischargeTemperatureK,
      unit: readings.dischargeUnit,
      label: `${machine.name} stage ${stage.index}`,
    });
  }
  return targets.map((target) => {
    try {
      const predicted = memoised(
        ctx,
        'dischargeTemperature',
        {
          suctionTemperatureK,
          suctionPressurePa: readings.suctionPressurePa,
          dischargePressurePa: readings.dischargePressurePa,
          composition,
          ...(target.exponent === undefined ? {} : { polytropicExponent: target.exponent }),
        },
        dischargeTemperature,
      );
      const assessment = assessDischargeTemperature({
        suctionTemperatureK,
        predictedK: predicted.temperatureK,
        observedK: target.observed,
        pressureRatio: predicted.pressureRatio,
        ...(stage.dischargeTemperatureLimitK === undefined ? {} : { limitK: stage.dischargeTemperatureLimitK }),
      });
      const message = `${target.label}: observed ${display(ctx, target.observed, target.unit)} against ${display(ctx, predicted.temperatureK, target.unit)} predicted. ${assessment.message}`;
      return makeFinding(
        ctx,
        'dischargeTemperature',
        target.subject,
        assessment.status,
        message,
        {
          observedK: target.observed,
          predictedK: predicted.temperatureK,
          excessK: assessment.excessK,
          excessFraction: assessment.excessFraction,
          apparentExponent: assessment.apparentExponent,
          k: predicted.k,
          pressureRatio: predicted.pressureRatio,
        },
        {
          suctionTemperatureK,
          suctionPressurePa: readings.suctionPressurePa,
          dischargePressurePa: readings.dischargePressurePa,
          composition,
          limitK: stage.dischargeTemperatureLimitK ?? null,
          warnings: [...predicted.warnings, ...assessment.warnings],
        },
      );
    } catch (error) {
      return inputFinding(ctx, target.subject, `the discharge temperature of ${target.label}`, error);
    }
  });
}

function performanceFinding(
  ctx: RoundContext,
  machine: Machine,
  stage: Stage,
  cylinders: Cylinder[],
  readings: StageReadings,
  composition: Record<string, number>,
  standardBasis: 'Sm3-15C' | 'Nm3-0C' | 'SCF-60F',
  subject: Finding['subject'],
): Finding {
  try {
    const numbers: Finding['numbers'] = {};
    let inletFlowM3s = 0;
    let standardFlowM3s = 0;
    let massFlowKgS = 0;
    let isentropicPowerW = 0;
    let shaftPowerW = 0;
    let ratio = 0;
    let predictedK = 0;
    const idle: string[] = [];
    const warnings = new Set<string>();
    for (const cylinder of cylinders) {
      const result = memoised(
        ctx,
        'stagePerformance',
        cylinderStageInput(
          machine,
          stage,
          cylinder,
          { ...readings, suctionTemperatureK: readings.suctionTemperatureK as number },
          composition,
          standardBasis,
        ),
        stagePerformance,
      );
      inletFlowM3s += result.inletFlowM3s;
      standardFlowM3s += result.standardFlowM3s;
      massFlowKgS += result.massFlowKgS ?? 0;
      isentropicPowerW += result.isentropicPowerW;
      shaftPowerW += result.shaftPowerW;
      ratio = result.pressureRatio;
      predictedK = result.predictedDischargeTemperatureK;
      numbers[`${cylinder.id}.veHead`] = result.head.volumetricEfficiency;
      numbers[`${cylinder.id}.veCrank`] = result.crank.volumetricEfficiency;
      if (!result.delivers) idle.push(cylinder.id);
      for (const warning of result.warnings) warnings.add(warning);
    }
    Object.assign(numbers, {
      pressureRatio: ratio,
      predictedDischargeK: predictedK,
      inletFlowM3s,
      standardFlowM3s,
      massFlowKgS,
      isentropicPowerW,
      shaftPowerW,
    });
    const kw = (watts: number) => `${(watts / 1000).toFixed(0)} kW`;
    const severity = idle.length ? 'alarm' : warnings.has('W_RATIO_HIGH') ? 'watch' : 'ok';
    let message = `${machine.name} stage ${stage.index}: ratio ${ratio.toFixed(2)}, capacity ${(standardFlowM3s * 3600).toFixed(0)} ${standardBasis === 'SCF-60F' ? 'standard m³/h (60 °F basis)' : standardBasis === 'Nm3-0C' ? 'Nm³/h' : 'Sm³/h'}, about ${kw(shaftPowerW)} at the shaft (${kw(isentropicPowerW)} isentropic).`;
    if (idle.length)
      message += ` Cylinder ${idle.join(', ')} delivers nothing at this ratio: clearance re-expansion fills the stroke. Check the pressures and unloaders.`;
    else if (warnings.has('W_RATIO_HIGH')) message += ' The ratio is unusually high for one stage: check the gauges.';
    return makeFinding(ctx, 'stagePerformance', subject, severity, message, numbers, {
      suctionPressurePa: readings.suctionPressurePa,
      dischargePressurePa: readings.dischargePressurePa,
      suctionTemperatureK: readings.suctionTemperatureK,
      speedRpm: machine.frame.ratedSpeedRpm,
      composition,
    });
  } catch (error) {
    return inputFinding(ctx, subject, `the performance of ${machine.name} stage ${stage.index}`, error);
  }
}

function rodLoadFinding(
  ctx: RoundContext,
  machine: Machine,
  stage: Stage,
  cylinder: Cylinder,
  readings: StageReadings,
  composition: Record<string, number>,
): Finding {
  const subject = { machineId: machine.id, stageId: stage.id, cylinderId: cylinder.id, throw: cylinder.throw };
  try {
    const frameThrow = machine.frame.throws.find((t) => t.index === cylinder.throw);
    let exponent = cylinder.polytropicExponent;
    if (exponent === undefined) {
      exponent =
        readings.suctionTemperatureK === null
          ? gasProperties(composition, 300).k
          : memoised(
              ctx,
              'dischargeTemperature',
              {
                suctionTemperatureK: readings.suctionTemperatureK,
                suctionPressurePa: readings.suctionPressurePa,
                dischargePressurePa: readings.dischargePressurePa,
                composition,
              },
              dischargeTemperature,
            ).k;
    }
    const result = memoised(
      ctx,
      'rodLoad',
      {
        boreM: cylinder.boreM,
        rodM: cylinder.rodM,
        strokeM: machine.frame.strokeM,
        connectingRodM: machine.frame.connectingRodM,
        speedRpm: machine.frame.ratedSpeedRpm,
        suctionPressurePa: readings.suctionPressurePa,
        dischargePressurePa: readings.dischargePressurePa,
        distancePiecePressurePa: ctx.barometricPa,
        headClearance: cylinder.headClearance,
        crankClearance: cylinder.crankClearance,
        headActive: cylinder.headActive,
        crankActive: cylinder.crankActive,
        exponent,
        reciprocatingMassKg: frameThrow?.reciprocatingMassKg ?? 0,
        ratedCompressionN: machine.frame.ratedCompressionN,
        ratedTensionN: machine.frame.ratedTensionN,
        ...(machine.frame.reversalCriterion ? { reversalCriterion: machine.frame.reversalCriterion } : {}),
      },
      rodLoad,
    );
    return makeFinding(
      ctx,
      'rodLoad',
      subject,
      result.status,
      `${machine.name} throw ${cylinder.throw} (${cylinder.id}): ${result.message}`,
      {
        gasCompressionN: result.gas.compressionN,
        gasTensionN: result.gas.tensionN,
        combinedCompressionN: result.combined.compressionN,
        combinedTensionN: result.combined.tensionN,
        compressionAtDeg: result.combined.compressionAtDeg,
        tensionAtDeg: result.combined.tensionAtDeg,
        reversalDeg: result.reversal.degrees,
        reversalFraction: result.reversal.fraction,
        ratedCompressionN: machine.frame.ratedCompressionN,
        ratedTensionN: machine.frame.ratedTensionN,
      },
      {
        suctionPressurePa: readings.suctionPressurePa,
        dischargePressurePa: readings.dischargePressurePa,
        distancePiecePressurePa: ctx.barometricPa,
        exponent,
        speedRpm: machine.frame.ratedSpeedRpm,
      },
    );
  } catch (error) {
    return inputFinding(ctx, subject, `the rod load of ${machine.name} throw ${cylinder.throw}`, error);
  }
}
