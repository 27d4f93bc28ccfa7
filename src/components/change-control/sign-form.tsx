import { useState } from 'react';
import type { SignatureMeaning } from '../../contracts/change-requests';
import { useSignChange } from '../../hooks/use-sign-change';
import { Button, Card, Choice, Field, Text } from '../ui';
import { MEANING_HINTS, MEANING_LABELS } from './labels';

const MEANINGS: SignatureMeaning[] = ['reviewed', 'approved', 'rejected'];

/** The electronic signature: meaning, comment and the signer's password typed again at this moment. */
export function SignForm({ id, signerName, recordHash }: { id: number; signerName: string; recordHash: string }) {
  const [meaning, setMeaning] = useState<SignatureMeaning>('reviewed');
  const [comment, setComment] = useState('');
  const [password, setPassword] = useState('');
  const { submit, error, isBusy } = useSignChange(id);
  async function onSign() {
    const done = await submit({ meaning, comment, password });
    setPassword('');
    if (done) setComment('');
  }
  return (
    <Card testID="sign-form">
      <Text variant="title" accessibilityRole="header">
        Sign
      </Text>
      <Text variant="small" tone="muted">
        Signing as {signerName}. Your signature is bound to record hash {recordHash.slice(0, 16)}…; if the plan or request changes, it cannot be signed.
      </Text>
      <Choice
        label="Meaning"
        value={meaning}
        options={MEANINGS.map((m) => ({ value: m, label: MEANING_LABELS[m] }))}
        onChange={setMeaning}
        testID="sign-meaning"
      />
      <Text variant="small" tone="muted">
        {MEANING_HINTS[meaning]}
      </Text>
      <Field label="Comment" value={comment} onChangeText={setComment} multiline error={error?.fields.comment} testID="sign-comment" />
      <Field
        label="Your password"
        value={password}
        onChangeText={setPassword}
        secureTextEntry
        autoComplete="current-password"
        error={error?.fields.password}
        hint="Typed again for each signature."
        testID="sign-password"
        onSubmitEditing={onSign}
      />
      {error && !error.fields.password ? (
        <Text tone="danger" accessibilityLiveRegion="polite" testID="sign-error">
          {error.message}
        </Text>
      ) : null}
      <Button
        label={`Sign as ${MEANING_LABELS[meaning].toLowerCase()}`}
        variant={meaning === 'rejected' ? 'danger' : 'primary'}
        onPress={onSign}
        isBusy={isBusy}
        disabled={!password}
        testID="sign-submit"
      />
    </Card>
  );
}
