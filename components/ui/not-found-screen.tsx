/** The page for addresses that do not exist (a mistyped or outdated link). */
import { Screen } from './screen';
import { Heading, Text } from './text';
import { TextLink } from './text-link';

export function NotFoundScreen() {
  return (
    <Screen width="form" centered testID="not-found">
      <Heading>Page not found</Heading>
      <Text>This address does not lead anywhere in Boardside. The link may be mistyped or out of date.</Text>
      <TextLink href="/" label="Go to your home page" testID="not-found-home" />
    </Screen>
  );
}
