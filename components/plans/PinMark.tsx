import Svg, { Circle, G, Polygon, Rect, Text as SvgText } from 'react-native-svg';
import type { FindingStatus, Severity } from '../../shared/words';
import { fonts } from '../theme';
import { OVERDUE_HALO, SEVERITY_SHAPE, STATUS_PIN, UNIT_PIN, type PinShape } from './pinStyle';

/** The drawn pin of a finding: shape from severity, fill from status, number inside, halo when overdue. */
export function FindingPinMark({
  status,
  severity,
  overdue = false,
  text,
  size = 30,
  selected = false,
}: {
  status: Exclude<FindingStatus, 'voided'>;
  severity: Severity;
  overdue?: boolean;
  text?: string;
  size?: number;
  selected?: boolean;
}) {
  const c = STATUS_PIN[status];
  const shape: PinShape = SEVERITY_SHAPE[severity];
  const mid = size / 2;
  // The shape sits inside a margin that leaves room for the halo.
  const r = size / 2 - 3;
  const fontSize = text && text.length > 3 ? size * 0.3 : size * 0.36;
  return (
    <Svg width={size} height={size} viewBox={`0 0 ${size} ${size}`}>
      {overdue ? <Circle cx={mid} cy={mid} r={mid - 0.5} fill="none" stroke={OVERDUE_HALO} strokeWidth={3} /> : null}
      {selected ? <Circle cx={mid} cy={mid} r={mid - 0.5} fill="none" stroke="#1A1F1C" strokeWidth={2} strokeDasharray="3,2" /> : null}
      <G>
        {shape === 'diamond' ? (
          <Polygon points={`${mid},${mid - r} ${mid + r},${mid} ${mid},${mid + r} ${mid - r},${mid}`} fill={c.fill} stroke={c.stroke} strokeWidth={1.5} />
        ) : shape === 'square' ? (
          <Rect x={mid - r * 0.78} y={mid - r * 0.78} width={r * 1.56} height={r * 1.56} rx={2} fill={c.fill} stroke={c.stroke} strokeWidth={1.5} />
        ) : (
          <Circle cx={mid} cy={mid} r={r * 0.85} fill={c.fill} stroke={c.stroke} strokeWidth={1.5} />
        )}
      </G>
      {text ? (
        <SvgText x={mid} y={mid + fontSize * 0.36} fontSize={fontSize} fontFamily={fonts.bold} fontWeight="bold" fill={c.text} textAnchor="middle">
          {text}
        </SvgText>
      ) : null}
    </Svg>
  );
}

/** The drawn pin of a unit: a hollow spruce ring with a centre dot. */
export function UnitPinMark({ size = 22 }: { size?: number }) {
  const mid = size / 2;
  return (
    <Svg width={size} height={size} viewBox={`0 0 ${size} ${size}`}>
      <Circle cx={mid} cy={mid} r={mid - 2} fill={UNIT_PIN.fill} stroke={UNIT_PIN.stroke} strokeWidth={2.5} />
      <Circle cx={mid} cy={mid} r={2.5} fill={UNIT_PIN.stroke} />
    </Svg>
  );
}
