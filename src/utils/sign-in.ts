export interface SignInProblem {
  title: string;
  detail: string;
}

/**
 * The message for `/sign-in?error=…`. Unknown codes still get a plain message, so a new server
 * code never leaves the person without an explanation. (`unavailable`, the server not reached, is
 * not a sign-in problem: the sign-in page shows its own waiting state for it.)
 * @example signInErrorText('unknown_account')?.title // 'No access yet'
 */
export function signInErrorText(code: unknown): SignInProblem | null {
  if (typeof code !== 'string' || code === '') return null;
  switch (code) {
    case 'unknown_account':
      return {
        title: 'No access yet',
        detail: 'This Google account has no access to Waterline yet. Ask an owner of your firm to invite you.',
      };
    case 'signed_out':
      return { title: 'You were signed out', detail: 'Your session ended. Sign in again to carry on.' };
    default:
      return { title: 'Signing in did not work', detail: 'Google did not complete the sign-in. Please try again.' };
  }
}
