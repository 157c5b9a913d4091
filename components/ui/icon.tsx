import Svg, { Circle, Path } from 'react-native-svg';

export type IconName = 'campaigns' | 'account' | 'plus' | 'dive' | 'search' | 'admin';

/** Our own small line icons, drawn on a 24-unit grid. */
export function Icon({ name, color, size = 22 }: { name: IconName; color: string; size?: number }) {
  const common = { stroke: color, strokeWidth: 2, fill: 'none', strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const };
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" accessibilityElementsHidden importantForAccessibility="no">
      {name === 'campaigns' ? (
        <>
          <Path d="M3 7l9-4 9 4-9 4-9-4z" {...common} />
          <Path d="M3 12l9 4 9-4" {...common} />
          <Path d="M3 17l9 4 9-4" {...common} />
        </>
      ) : null}
      {name === 'account' ? (
        <>
          <Circle cx={12} cy={8} r={4} {...common} />
          <Path d="M4 21c1.5-4 4.5-6 8-6s6.5 2 8 6" {...common} />
        </>
      ) : null}
      {name === 'plus' ? <Path d="M12 5v14M5 12h14" {...common} /> : null}
      {name === 'admin' ? <Path d="M12 3l8 3v6c0 4.5-3.4 7.8-8 9-4.6-1.2-8-4.5-8-9V6l8-3z M9 12l2 2 4-4" {...common} /> : null}
      {name === 'dive' ? <Path d="M4 4c2 6 4 10 8 12s6 2 8 4M12 16v4" {...common} /> : null}
      {name === 'search' ? (
        <>
          <Circle cx={11} cy={11} r={6} {...common} />
          <Path d="M20 20l-4.5-4.5" {...common} />
        </>
      ) : null}
    </Svg>
  );
}
