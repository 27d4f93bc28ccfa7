import { useState } from 'react';
import { MIN_PASSWORD_LENGTH } from '../../contracts/rules';
import { Field } from '../ui/field';

export type NewPassword = ReturnType<typeof useNewPassword>;

/** A new password typed twice (the invite and reset pages); `confirmed()` marks a mismatch and says whether they agree. */
export function useNewPassword() {
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [mismatch, setMismatch] = useState(false);
  const confirmed = () => {
    setMismatch(password !== repeat);
    return password === repeat;
  };
  return { password, setPassword, repeat, setRepeat, mismatch, confirmed };
}

/** The two fields of `useNewPassword`: `label` and `label` "again", test ids `testID` and `testID`-repeat. */
export function NewPasswordFields({
  state,
  label,
  testID,
  error,
  onSubmit,
}: {
  state: NewPassword;
  label: string;
  testID: string;
  error?: string;
  onSubmit: () => void;
}) {
  return (
    <>
      <Field
        label={label}
        testID={testID}
        value={state.password}
        onChangeText={state.setPassword}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${MIN_PASSWORD_LENGTH} characters`}
        error={error}
      />
      <Field
        label={`${label} again`}
        testID={`${testID}-repeat`}
        value={state.repeat}
        onChangeText={state.setRepeat}
        secureTextEntry
        autoComplete="new-password"
        onSubmitEditing={onSubmit}
        error={state.mismatch ? 'The two passwords differ' : undefined}
      />
    </>
  );
}
