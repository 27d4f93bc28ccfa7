import { useLocalSearchParams } from 'expo-router';
import type { ReactNode } from 'react';
import { KeyboardAvoidingView, ScrollView, StyleSheet, View } from 'react-native';
import type { ApiError } from '../../api/client';
import { space, useColors } from '../../theme';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { ErrorState } from '../ui/states';
import { Text } from '../ui/text';

// The signed-out pages: signing in, and the pages a mail links to with a token (an invite, a password reset).

/** Their frame: the brand (and a tagline) on the navigation colour above one narrow column. */
export function AuthPage({ testID, tagline, children }: { testID: string; tagline?: string; children: ReactNode }) {
  const c = useColors();
  return (
    <KeyboardAvoidingView style={[styles.fill, { backgroundColor: c.navBackground }]} behavior="padding">
      <ScrollView contentContainerStyle={styles.center} keyboardShouldPersistTaps="handled">
        <View style={styles.column} testID={testID}>
          <View style={styles.brand}>
            <Text variant="figure" style={{ color: c.navActive }} accessibilityRole="header">
              Yieldpoint
            </Text>
            {tagline ? <Text style={{ color: c.navText }}>{tagline}</Text> : null}
          </View>
          {children}
        </View>
      </ScrollView>
    </KeyboardAvoidingView>
  );
}

type Submit = { label: string; testID: string; onPress: () => unknown; isBusy: boolean };

/**
 * Their form: a title, a line on whom it is for, the fields (each shows its own error), the API's error that
 * belongs to no field, and the one button.
 */
export function AuthCard({
  title,
  note,
  error,
  errorTestID,
  submit,
  footer,
  children,
}: {
  title: string;
  note?: ReactNode;
  error: ApiError | null | undefined;
  errorTestID: string;
  submit: Submit;
  footer?: ReactNode;
  children: ReactNode;
}) {
  const general = error && !Object.keys(error.fields).length ? error.message : null;
  return (
    <Card>
      <Text variant="title">{title}</Text>
      {note}
      {children}
      {general ? (
        <Text tone="danger" accessibilityRole="alert" testID={errorTestID}>
          {general}
        </Text>
      ) : null}
      <Button label={submit.label} testID={submit.testID} onPress={submit.onPress} isBusy={submit.isBusy} />
      {footer}
    </Card>
  );
}

/** The page a mail links to: the form for the link's token, or a plain message when the link arrived cut short. */
export function MailLinkPage({ testID, linkName, children }: { testID: string; linkName: string; children: (token: string) => ReactNode }) {
  const { token } = useLocalSearchParams<{ token?: string }>();
  return (
    <AuthPage testID={testID}>
      {token ? children(token) : <ErrorState error={new Error(`This ${linkName} link is not complete. Open the link from the mail again.`)} />}
    </AuthPage>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  center: { flexGrow: 1, justifyContent: 'center', padding: space.lg },
  column: { width: '100%', maxWidth: 420, alignSelf: 'center', gap: space.xl },
  brand: { gap: space.sm },
});
