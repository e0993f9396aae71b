import { AuthPanel } from '../components/auth/auth-panel';
import { ResetRequestForm } from '../components/auth/reset-request-form';

/** Asks for a link to choose a new password. */
export function ResetPasswordRoute() {
  return (
    <AuthPanel
      title="Reset your password"
      intro={
        <p>
          Give the e-mail address of your Cartouche account, and a link to choose a new password is sent to it. If your
          organisation signs you in, change your password there instead.
        </p>
      }
    >
      <ResetRequestForm />
    </AuthPanel>
  );
}
