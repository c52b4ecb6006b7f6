/**
 * The parts the set-password and change-password forms share: the new password typed twice, and
 * what the person sees once it is set (their sessions end, so they sign in again).
 */
import { Field, TextInput } from "@/components/ui/field";
import { Banner } from "@/components/ui/banner";

export function NewPasswordFields({ errors, hint }: { errors: { newPassword?: string; confirmPassword?: string }; hint: string }) {
  return (
    <>
      <Field label="New password" name="newPassword" error={errors.newPassword} hint={hint}>
        <TextInput id="newPassword" name="newPassword" type="password" autoComplete="new-password" maxLength={200} invalid={!!errors.newPassword} />
      </Field>
      <Field label="New password again" name="confirmPassword" error={errors.confirmPassword}>
        <TextInput id="confirmPassword" name="confirmPassword" type="password" autoComplete="new-password" maxLength={200} invalid={!!errors.confirmPassword} />
      </Field>
    </>
  );
}

export function PasswordSetNotice({ message }: { message: string }) {
  return (
    <div className="flex flex-col gap-3">
      <Banner tone="success">{message}</Banner>
      <a className="text-sm underline" href="/signin">Sign in</a>
    </div>
  );
}
