import { TextField } from '@/components/ui/field';

interface NewPasswordFieldsProps {
  /** "Password" or "New password"; the second field is labelled "<label>, again". */
  label: string;
  hint?: string;
  autoFocus?: boolean;
  password: string;
  confirmation: string;
  onPasswordChange: (value: string) => void;
  onConfirmationChange: (value: string) => void;
  passwordError?: string;
  confirmationError?: string;
}

/** A new password typed twice (checked by withConfirmation in password-pair.ts). */
export function NewPasswordFields(props: NewPasswordFieldsProps) {
  return (
    <>
      <TextField
        label={props.label}
        type="password"
        autoComplete="new-password"
        autoFocus={props.autoFocus}
        hint={props.hint ?? 'At least 10 characters.'}
        value={props.password}
        onValueChange={props.onPasswordChange}
        error={props.passwordError}
      />
      <TextField
        label={`${props.label}, again`}
        type="password"
        autoComplete="new-password"
        value={props.confirmation}
        onValueChange={props.onConfirmationChange}
        error={props.confirmationError}
      />
    </>
  );
}
