export const MIN_PASSWORD = 10;
export const MAX_PASSWORD = 128;

export function passwordProblem(pw: string): string | undefined {
  if (pw.length < MIN_PASSWORD) return `Use at least ${MIN_PASSWORD} characters (${pw.length} so far).`;
  if (pw.length > MAX_PASSWORD) return `Use at most ${MAX_PASSWORD} characters.`;
  return undefined;
}

export const emailProblem = (e: string) => (/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(e.trim()) ? undefined : 'Enter an e-mail address like name@institute.org.');
