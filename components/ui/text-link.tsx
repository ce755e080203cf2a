/**
 * TextLink: an in-app link styled as underlined text, padded to a 48 px tap height. Underlined so
 * it is recognisable as a link without relying on colour.
 */
import { Link, type Href } from 'expo-router';
import { StyleSheet } from 'react-native';

import { colors, fonts, tapTarget, type } from './theme';

export function TextLink({ href, label, testID }: { href: Href; label: string; testID?: string }) {
  return (
    <Link href={href} testID={testID} accessibilityRole="link" style={styles.link}>
      {label}
    </Link>
  );
}

const styles = StyleSheet.create({
  link: {
    ...type.body,
    fontFamily: fonts.bold,
    color: colors.primary,
    textDecorationLine: 'underline',
    minHeight: tapTarget,
    paddingVertical: (tapTarget - type.body.lineHeight) / 2,
    alignSelf: 'flex-start',
  },
});
