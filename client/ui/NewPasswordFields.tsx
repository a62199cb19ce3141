import React from 'react';
import { MIN_PASSWORD_LENGTH } from '../validation';
import { TextField } from './TextField';

/** A new password typed twice (accepting an invitation, choosing a password after a reset). */
export function NewPasswordFields(props: {
  label: string;
  /** testIDs are `${testIDPrefix}-password` and `${testIDPrefix}-confirm`. */
  testIDPrefix: string;
  password: string;
  confirm: string;
  onChangePassword: (v: string) => void;
  onChangeConfirm: (v: string) => void;
  errors: { password?: string; confirm?: string };
  onSubmit: () => void;
}) {
  return (
    <>
      <TextField
        label={props.label}
        testID={`${props.testIDPrefix}-password`}
        value={props.password}
        onChangeText={props.onChangePassword}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${MIN_PASSWORD_LENGTH} characters.`}
        error={props.errors.password}
      />
      <TextField
        label="Repeat password"
        testID={`${props.testIDPrefix}-confirm`}
        value={props.confirm}
        onChangeText={props.onChangeConfirm}
        secureTextEntry
        autoComplete="new-password"
        error={props.errors.confirm}
        onSubmitEditing={props.onSubmit}
      />
    </>
  );
}
