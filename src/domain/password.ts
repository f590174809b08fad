import { appConfig } from '@/config';

/** Returns a sentence saying what is wrong with a new password, or null when it meets the policy. */
export function passwordProblem(password: string, repeated: string): string | null {
  if (password.length < appConfig.passwordMinLength) {
    return `The password needs at least ${appConfig.passwordMinLength} characters (it has ${password.length}).`;
  }
  if (password.length > appConfig.passwordMaxLength) {
    return `The password may have at most ${appConfig.passwordMaxLength} characters.`;
  }
  if (password !== repeated) return 'The two passwords are not the same.';
  return null;
}

/** Returns the policy in one sentence, for the hint under password fields. */
export function passwordPolicyHint(): string {
  return `At least ${appConfig.passwordMinLength} characters. A few unrelated words make a long password that is easy to remember.`;
}
