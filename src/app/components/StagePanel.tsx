import { memo } from 'preact/compat';
import type { Finding } from '../../schema';
import { type DisplayUnits, formatNumber } from '../models/format';
import { FindingLine, SEVERITY_WORDS } from './PointCard';

/**
 * The engineering results of one stage, as soon as their inputs exist: discharge temperature against prediction,
 * VE, capacity and power; each cylinder's valve covers with the suspect highlighted; each throw's rod load.
 */
interface StagePanelProps {
  findings: Finding[];
  units: DisplayUnits;
  barometricPa: number;
  title: string;
  /** Keys, severities and messages of the findings: the panel is drawn again only when it changes. */
  signature: string;
}

export const StagePanel = memo(
  StagePanelView,
  (before, after) => before.signature === after.signature && before.units === after.units,
);

function StagePanelView(props: StagePanelProps) {
  const { findings, units, barometricPa } = props;
  const performance = findings.find((f) => f.rule === 'stagePerformance');
  const discharge = findings.filter(
    (f) => f.rule === 'dischargeTemperature' || (f.rule === 'input' && f.subject.stageId),
  );
  const covers = findings.filter((f) => f.rule === 'valveCovers');
  const rods = findings.filter((f) => f.rule === 'rodLoad');
  if (!performance && !discharge.length && !covers.length && !rods.length) return null;
  const n = (finding: Finding, key: string) => formatNumber(key, finding.numbers[key] ?? null, units, barometricPa);
  return (
    <section class="card panel" aria-label={`${props.title}: engineering checks`} data-testid="stage-panel">
      <h3>{props.title}: engineering checks</h3>
      {performance ? (
        <div class="panel__block">
          <h4>Capacity and power</h4>
          <dl class="numbers numbers--wide">
            <div>
              <dt>Pressure ratio</dt>
              <dd>{(performance.numbers.pressureRatio ?? 0).toFixed(2)}</dd>
            </div>
            <div>
              <dt>Predicted discharge</dt>
              <dd>{n(performance, 'predictedDischargeK')}</dd>
            </div>
            <div>
              <dt>Inlet capacity (actual)</dt>
              <dd>{n(performance, 'inletFlowM3s')}</dd>
            </div>
            <div>
              <dt>Shaft power, estimated</dt>
              <dd>{n(performance, 'shaftPowerW')}</dd>
            </div>
          </dl>
          <table class="table">
            <caption class="visually-hidden">Volumetric efficiency per cylinder end</caption>
            <thead>
              <tr>
                <th scope="col">Cylinder</th>
                <th scope="col">VE head end</th>
                <th scope="col">VE crank end</th>
              </tr>
            </thead>
            <tbody>
              {Object.keys(performance.numbers)
                .filter((key) => key.endsWith('.veHead'))
                .map((key) => {
                  const cylinder = key.split('.')[0] as string;
                  return (
                    <tr key={cylinder}>
                      <th scope="row">{cylinder}</th>
                      <td>{n(performance, `${cylinder}.veHead`)}</td>
                      <td>{n(performance, `${cylinder}.veCrank`)}</td>
                    </tr>
                  );
                })}
            </tbody>
          </table>
        </div>
      ) : null}
      {discharge.map((finding) => (
        <FindingLine key={finding.key} finding={finding} units={units} barometricPa={barometricPa} />
      ))}
      {covers.map((finding) => {
        const list =
          (finding.inputs.covers as Array<{ id: string; status: Finding['severity']; suspect: string | null }>) ?? [];
        return (
          <div class="panel__block" key={finding.key}>
            <h4>Valve covers, cylinder {finding.subject.cylinderId}</h4>
            <table class="table" data-testid={`covers-${finding.subject.cylinderId}`}>
              <caption class="visually-hidden">Valve cover temperatures against their peers and the gas</caption>
              <thead>
                <tr>
                  <th scope="col">Valve</th>
                  <th scope="col">Against peers</th>
                  <th scope="col">Against gas</th>
                  <th scope="col">Status</th>
                </tr>
              </thead>
              <tbody>
                {list.map((cover) => (
                  <tr
                    key={cover.id}
                    class={cover.suspect ? 'suspect' : ''}
                    data-suspect={cover.suspect ? 'true' : 'false'}
                  >
                    <th scope="row">{cover.id}</th>
                    <td>{n(finding, `${cover.id}.peerDeltaK`)}</td>
                    <td>{n(finding, `${cover.id}.gasDeltaK`)}</td>
                    <td>
                      {cover.suspect
                        ? `${SEVERITY_WORDS[cover.status]}: ${cover.suspect.replace('-', ' ')}?`
                        : SEVERITY_WORDS[cover.status]}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <FindingLine finding={finding} units={units} barometricPa={barometricPa} />
          </div>
        );
      })}
      {rods.map((finding) => (
        <FindingLine key={finding.key} finding={finding} units={units} barometricPa={barometricPa} />
      ))}
    </section>
  );
}
