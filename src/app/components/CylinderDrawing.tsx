import type { Cylinder, ValvePosition } from '../../schema';

/**
 * A plain drawing of one cylinder seen from above, drawn from the configuration: head end left, crank end right
 * (toward the frame), suction valves on top, discharge valves below. Each valve is a button.
 */
export function CylinderDrawing(props: {
  cylinder: Cylinder;
  positions: ValvePosition[];
  selected: string | null;
  onSelect: (positionId: string) => void;
  highlight?: ReadonlySet<string>;
}) {
  const { positions } = props;
  const width = 520;
  const height = 300;
  const body = { x: 110, y: 90, w: 300, h: 120 };
  const place = (position: ValvePosition) => {
    const sameGroup = positions
      .filter((p) => p.end === position.end && p.service === position.service)
      .sort((a, b) => a.index - b.index);
    const slot = sameGroup.indexOf(position);
    const half = body.w / 2;
    const x0 = position.end === 'head' ? body.x : body.x + half;
    const x = x0 + ((slot + 1) * half) / (sameGroup.length + 1);
    const y = position.service === 'suction' ? body.y - 40 : body.y + body.h + 40;
    return { x, y };
  };
  return (
    // biome-ignore lint/a11y/useSemanticElements: the drawing groups its valve buttons; an SVG cannot be a fieldset
    <svg
      class="cylinder"
      viewBox={`0 0 ${width} ${height}`}
      role="group"
      aria-label={`Cylinder ${props.cylinder.id}: valve positions`}
    >
      <rect x={body.x} y={body.y} width={body.w} height={body.h} rx="10" class="cylinder__body" />
      <line
        x1={body.x + body.w / 2}
        y1={body.y + 8}
        x2={body.x + body.w / 2}
        y2={body.y + body.h - 8}
        class="cylinder__piston"
      />
      <line
        x1={body.x + body.w / 2}
        y1={body.y + body.h / 2}
        x2={width - 20}
        y2={body.y + body.h / 2}
        class="cylinder__rod"
      />
      <text x={body.x + body.w / 4} y={body.y + body.h / 2 + 6} class="cylinder__label" text-anchor="middle">
        Head end
      </text>
      <text x={body.x + (3 * body.w) / 4} y={body.y + body.h / 2 - 14} class="cylinder__label" text-anchor="middle">
        Crank end
      </text>
      <text x={16} y={body.y - 34} class="cylinder__side">
        Suction
      </text>
      <text x={16} y={body.y + body.h + 46} class="cylinder__side">
        Discharge
      </text>
      {positions.map((position) => {
        const { x, y } = place(position);
        const chosen = props.selected === position.id;
        const marked = props.highlight?.has(position.id) ?? false;
        return (
          // biome-ignore lint/a11y/useSemanticElements: an SVG shape cannot be a <button>; it carries the button role, name, state and keys
          <g
            key={position.id}
            role="button"
            tabIndex={0}
            aria-pressed={chosen ? 'true' : 'false'}
            aria-label={`Valve ${position.id}, ${position.end} end ${position.service}`}
            class={`valve ${chosen ? 'valve--chosen' : ''} ${marked ? 'valve--marked' : ''}`}
            data-testid={`valve-${position.id}`}
            onClick={() => props.onSelect(position.id)}
            onKeyDown={(event) => {
              if (event.key === 'Enter' || event.key === ' ') {
                event.preventDefault();
                props.onSelect(position.id);
              }
            }}
          >
            <circle cx={x} cy={y} r="28" />
            <text x={x} y={y + 5} text-anchor="middle">
              {position.service === 'suction' ? 'S' : 'D'}
              {position.index}
            </text>
          </g>
        );
      })}
    </svg>
  );
}
