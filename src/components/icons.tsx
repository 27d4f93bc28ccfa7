import Svg, { Circle, Path, Rect } from 'react-native-svg';

// Yieldpoint's own line icons, drawn on a 24 px grid with a 2 px stroke.
export type IconName = 'planner' | 'signoffs' | 'lots' | 'batches' | 'site' | 'billing' | 'you' | 'caution';

type Props = { name: IconName; color: string; size?: number };

export function Icon({ name, color, size = 24 }: Props) {
  const stroke = { stroke: color, strokeWidth: 2, fill: 'none', strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const };
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" aria-hidden>
      {name === 'planner' && (
        <>
          <Path d="M3 20h18" {...stroke} />
          <Path d="M4 17c3-1 4-9 8-9s4 5 8 6" {...stroke} />
          <Circle cx={12} cy={8} r={2} {...stroke} />
        </>
      )}
      {name === 'signoffs' && (
        <>
          <Path d="M5 3h9l5 5v13H5z" {...stroke} />
          <Path d="M8.5 14l2.5 2.5 4.5-5" {...stroke} />
        </>
      )}
      {name === 'lots' && (
        <>
          <Path d="M4 8l8-4 8 4v9l-8 4-8-4z" {...stroke} />
          <Path d="M4 8l8 4 8-4M12 12v9" {...stroke} />
        </>
      )}
      {name === 'batches' && (
        <>
          <Path d="M7 3h10M8 3v6l-4 9a2 2 0 0 0 2 3h12a2 2 0 0 0 2-3l-4-9V3" {...stroke} />
          <Path d="M6 15h12" {...stroke} />
        </>
      )}
      {name === 'billing' && (
        <>
          <Rect x={3} y={6} width={18} height={13} rx={2} {...stroke} />
          <Path d="M3 10h18M7 15h4" {...stroke} />
        </>
      )}
      {name === 'site' && (
        <>
          <Rect x={4} y={9} width={16} height={12} rx={1} {...stroke} />
          <Path d="M4 9l5-5h6l5 5M9 21v-5h6v5" {...stroke} />
        </>
      )}
      {name === 'you' && (
        <>
          <Circle cx={12} cy={8} r={4} {...stroke} />
          <Path d="M4 21c1-4 4-6 8-6s7 2 8 6" {...stroke} />
        </>
      )}
      {name === 'caution' && (
        <>
          <Path d="M12 3l10 18H2z" {...stroke} />
          <Path d="M12 10v5M12 18v.5" {...stroke} />
        </>
      )}
    </Svg>
  );
}
