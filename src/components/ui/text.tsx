import { Text as RNText, type TextProps } from 'react-native';
import { font, type as typeScale, useColors, type Palette } from '../../theme';

type Variant = keyof typeof typeScale;
type Tone = 'default' | 'muted' | 'primary' | 'danger' | 'success' | 'warning' | 'onPrimary';

const toneColor = (c: Palette, tone: Tone) =>
  ({ default: c.text, muted: c.textMuted, primary: c.primary, danger: c.danger, success: c.success, warning: c.warning, onPrimary: c.onPrimary })[tone];

export type AppTextProps = TextProps & { variant?: Variant; tone?: Tone; weight?: keyof typeof font };

/** All text in the app: the shipped font, the type scale and a semantic colour. */
export function Text({ variant = 'body', tone = 'default', weight, style, ...rest }: AppTextProps) {
  const c = useColors();
  const heading = variant === 'title' || variant === 'headline' || variant === 'figure';
  return <RNText {...rest} style={[{ fontFamily: font[weight ?? (heading ? 'bold' : 'regular')], color: toneColor(c, tone), ...typeScale[variant] }, style]} />;
}
