/**
 * Text and Heading: the only places that pick fonts, so the type scale and contrast rules in
 * theme.ts hold everywhere. Headings get the header role so screen readers can jump between them.
 */
import type { ReactNode } from 'react';
import { Text as RNText, type TextProps as RNTextProps, type TextStyle } from 'react-native';

import { colors, fonts, type, type TypeVariant } from './theme';

export type TextProps = RNTextProps & {
  variant?: TypeVariant;
  weight?: 'regular' | 'bold';
  tone?: 'default' | 'muted' | 'error' | 'primary' | 'inverse';
  align?: TextStyle['textAlign'];
  /** Condensed figures (times, speeds). */
  numeric?: boolean;
  children?: ReactNode;
};

const toneColor = {
  default: colors.ink,
  muted: colors.inkMuted,
  error: colors.error,
  primary: colors.primary,
  inverse: colors.onPrimary,
} as const;

export function Text({
  variant = 'body',
  weight = 'regular',
  tone = 'default',
  align,
  numeric = false,
  style,
  ...rest
}: TextProps) {
  const family = numeric ? fonts.numbers : weight === 'bold' ? fonts.bold : fonts.regular;
  return (
    <RNText
      style={[type[variant], { fontFamily: family, color: toneColor[tone], textAlign: align }, style]}
      {...rest}
    />
  );
}

export type HeadingProps = Omit<TextProps, 'variant' | 'weight'> & {
  level?: 1 | 2 | 3;
};

const headingVariant: Record<1 | 2 | 3, TypeVariant> = { 1: 'headline', 2: 'title', 3: 'bodyLarge' };

export function Heading({ level = 1, ...rest }: HeadingProps) {
  return (
    <Text
      accessibilityRole="header"
      // aria-level lets the web output real h1/h2/h3 semantics.
      aria-level={level}
      variant={headingVariant[level]}
      weight="bold"
      {...rest}
    />
  );
}
