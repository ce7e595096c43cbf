/** The better-auth calls the auth pages make, each unwrapped to data or an ApiError. */
import { authCall } from '@/lib/api-client';
import { authClient } from '@/lib/auth-client';

export const VERIFIED_PATH = '/verified';

export const signUpEmail = (input: { name: string; email: string; password: string }) =>
  authCall(authClient.signUp.email({ ...input, callbackURL: VERIFIED_PATH }));

export const signInEmail = (input: { email: string; password: string }) => authCall(authClient.signIn.email(input));

export const resendVerification = (email: string) => authCall(authClient.sendVerificationEmail({ email, callbackURL: VERIFIED_PATH }));

export const requestPasswordReset = (email: string) => authCall(authClient.requestPasswordReset({ email, redirectTo: '/reset-password' }));

export const resetPassword = (input: { newPassword: string; token: string }) => authCall(authClient.resetPassword(input));

export const changePassword = (input: { currentPassword: string; newPassword: string; revokeOtherSessions?: boolean }) =>
  authCall(authClient.changePassword(input));
