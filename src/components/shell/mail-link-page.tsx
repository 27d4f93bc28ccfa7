import { useLocalSearchParams } from 'expo-router';
import type { ReactNode } from 'react';
import { KeyboardAvoidingView, ScrollView, StyleSheet, View } from 'react-native';
import { space, useColors } from '../../theme';
import { ErrorState } from '../ui/states';
import { Text } from '../ui/text';

/**
 * The page a mail links to with a token (an invite, a password reset): the brand on the navigation colour and the
 * form for that token, or a plain message when the link arrived cut short.
 */
export function MailLinkPage({ testID, linkName, children }: { testID: string; linkName: string; children: (token: string) => ReactNode }) {
  const c = useColors();
  const { token } = useLocalSearchParams<{ token?: string }>();
  return (
    <KeyboardAvoidingView style={[styles.fill, { backgroundColor: c.navBackground }]} behavior="padding">
      <ScrollView contentContainerStyle={styles.center} keyboardShouldPersistTaps="handled">
        <View style={styles.column} testID={testID}>
          <Text variant="figure" style={{ color: c.navActive }} accessibilityRole="header">
            Yieldpoint
          </Text>
          {token ? children(token) : <ErrorState error={new Error(`This ${linkName} link is not complete. Open the link from the mail again.`)} />}
        </View>
      </ScrollView>
    </KeyboardAvoidingView>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  center: { flexGrow: 1, justifyContent: 'center', padding: space.lg },
  column: { width: '100%', maxWidth: 420, alignSelf: 'center', gap: space.xl },
});
