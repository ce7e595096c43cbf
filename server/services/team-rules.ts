/**
 * The rules for teams (better-auth organizations), in one place (issue 12 items 4 and 6):
 *
 * - names: 2 to 80 characters of letters, digits, spaces and . , ' & ( ) + - _, no web address
 *   (a team name is quoted in invitation mails and on public pages);
 * - slugs: lower-case letters, digits and single hyphens, 2 to 48 characters;
 * - reserved: the house team's name and slug, anything starting with "parallax", the staff words,
 *   and any look-alike (case, accents, Cyrillic/Greek letters that look Latin, 0/o, 1/l) of another
 *   team's name or slug;
 * - metadata: only { track, description }, typed and limited; whatever else is stored is never
 *   read back over the authoritative fields (id, name, slug, members);
 * - a user leads at most `teamsPerUser` teams;
 * - invitation mails: at most `invitesPerSenderPerHour` per sender and `invitesPerRecipientPerDay`
 *   per recipient address, counted in the table mail_quota on the injected clock.
 *
 * better-auth's organization endpoints call these from a before-hook in server/auth.ts.
 */
import { and, count, eq, gt, lt, ne } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '../db/client';
import { mailQuota, member, organization } from '../db/schema';
import { HOUSE_TEAM } from '../house-team';
import { TRACKS } from '@shared/vocabulary';

export const TEAM_NAME_MAX = 80;
export const TEAM_SLUG_MAX = 48;
export const TEAM_DESCRIPTION_MAX = 500;
export const TEAM_TRACKS = TRACKS;

export const teamMetadataSchema = z.object({
  track: z.enum(TEAM_TRACKS, { message: 'metadata.track must be "hardware" or "classical"' }).optional(),
  description: z.string().trim().max(TEAM_DESCRIPTION_MAX, `metadata.description: at most ${TEAM_DESCRIPTION_MAX} characters`).optional(),
}).strict();
export type TeamMetadata = z.infer<typeof teamMetadataSchema>;

/**
 * The public fields of a stored metadata string: only a valid track and description; anything else
 * (an "id", a "name", a script) is dropped, never spread over the team's own fields.
 */
export function readTeamMetadata(raw: string | null | undefined): TeamMetadata {
  let parsed: unknown;
  try { parsed = raw ? JSON.parse(raw) : {}; } catch { return {}; }
  if (!parsed || typeof parsed !== 'object') return {};
  const m = parsed as Record<string, unknown>;
  const out: TeamMetadata = {};
  const track = teamMetadataSchema.shape.track.safeParse(m.track);
  if (track.success && track.data) out.track = track.data;
  const description = teamMetadataSchema.shape.description.safeParse(m.description);
  if (description.success && description.data) out.description = description.data;
  return out;
}

const CONFUSABLES: Record<string, string> = {
  // Cyrillic and Greek letters that look like Latin ones, and digits read as letters
  а: 'a', в: 'b', е: 'e', ё: 'e', к: 'k', м: 'm', н: 'h', о: 'o', р: 'p', с: 'c', т: 't', у: 'y', х: 'x', і: 'i', ј: 'j', ѕ: 's', ԁ: 'd', ɡ: 'g',
  α: 'a', β: 'b', ε: 'e', η: 'n', ι: 'i', κ: 'k', ν: 'v', ο: 'o', ρ: 'p', τ: 't', υ: 'u', χ: 'x', ς: 's',
  '0': 'o', '1': 'l', '|': 'l', '!': 'l', '$': 's', '5': 's', '@': 'a',
};

/** The form two names share when they look alike: folded case, no accents, confusables mapped, letters and digits only. */
export function lookAlikeKey(s: string): string {
  const folded = s.normalize('NFKC').toLowerCase().normalize('NFKD').replace(/\p{M}+/gu, '');
  let out = '';
  for (const ch of folded) out += CONFUSABLES[ch] ?? ch;
  return out.replace(/[^a-z0-9]+/g, '').replace(/i/g, 'l');
}

const RESERVED_KEYS = new Set(['admin', 'administrator', 'admins', 'moderator', 'moderators', 'staff', 'support', 'system', 'housebaseline', 'house', 'teams', 'team', 'api'].map(lookAlikeKey));
const isReserved = (key: string) => key.startsWith(lookAlikeKey('parallax')) || key === lookAlikeKey(HOUSE_TEAM.name) || RESERVED_KEYS.has(key);

const NAME_CHARS = /^[\p{L}\p{M}\p{N} .,'&()+_-]+$/u;
const WEB_ADDRESS = /(:\/\/|\bwww\b|[\p{L}\p{N}-]\.[a-z]{2,}\b|@)/iu;
const SLUG = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;

export interface TeamProblem { field: 'name' | 'slug' | 'metadata' | 'logo'; message: string }

/** Checks a name, slug and metadata against the format rules (no database). */
export function teamFormatProblems(p: { name?: unknown; slug?: unknown; metadata?: unknown; logo?: unknown }): TeamProblem[] {
  const out: TeamProblem[] = [];
  if (p.name !== undefined) {
    const name = typeof p.name === 'string' ? p.name.trim() : '';
    if (name.length < 2 || name.length > TEAM_NAME_MAX) out.push({ field: 'name', message: `The team name must be 2 to ${TEAM_NAME_MAX} characters long.` });
    else if (WEB_ADDRESS.test(name)) out.push({ field: 'name', message: 'The team name must not contain a web or e-mail address (no "://", "www", "@" or domain such as "example.com").' });
    else if (!NAME_CHARS.test(name)) out.push({ field: 'name', message: "The team name may use letters, digits, spaces and . , ' & ( ) + - _ only." });
    else if (isReserved(lookAlikeKey(name))) out.push({ field: 'name', message: `The team name "${name}" is reserved (names of Parallax itself and its staff); choose another.` });
  }
  if (p.slug !== undefined) {
    const slug = typeof p.slug === 'string' ? p.slug : '';
    if (slug.length < 2 || slug.length > TEAM_SLUG_MAX || !SLUG.test(slug)) out.push({ field: 'slug', message: `The slug must be 2 to ${TEAM_SLUG_MAX} lower-case letters, digits and single hyphens, e.g. "cobalt-qubit-lab".` });
    else if (isReserved(lookAlikeKey(slug))) out.push({ field: 'slug', message: `The slug "${slug}" is reserved (Parallax's own teams and pages); choose another.` });
  }
  if (p.metadata !== undefined && p.metadata !== null) {
    const r = teamMetadataSchema.safeParse(p.metadata);
    if (!r.success) {
      const i = r.error.issues[0];
      const msg = i.code === 'unrecognized_keys' ? `metadata may hold only "track" and "description"; remove ${i.keys.map((k) => `"${k}"`).join(', ')}.` : i.message;
      out.push({ field: 'metadata', message: msg });
    }
  }
  if (p.logo !== undefined && p.logo !== null && p.logo !== '') out.push({ field: 'logo', message: 'Parallax shows no team logos; leave "logo" out.' });
  return out;
}

/** Format rules plus look-alikes of other teams' names and slugs (excludeTeamId: the team being renamed). */
export async function teamProblems(db: Db, p: { name?: unknown; slug?: unknown; metadata?: unknown; logo?: unknown; excludeTeamId?: string }): Promise<TeamProblem[]> {
  const out = teamFormatProblems(p);
  if (out.length || (p.name === undefined && p.slug === undefined)) return out;
  const others = await db.select({ name: organization.name, slug: organization.slug }).from(organization)
    .where(p.excludeTeamId ? ne(organization.id, p.excludeTeamId) : undefined);
  if (typeof p.name === 'string') {
    const key = lookAlikeKey(p.name);
    const clash = others.find((o) => lookAlikeKey(o.name) === key);
    if (clash) out.push({ field: 'name', message: `The team name "${p.name.trim()}" is too close to the existing team "${clash.name}"; choose a name that differs in more than case, accents or look-alike letters.` });
  }
  if (typeof p.slug === 'string') {
    const key = lookAlikeKey(p.slug);
    const clash = others.find((o) => lookAlikeKey(o.slug) === key);
    if (clash) out.push({ field: 'slug', message: `The slug "${p.slug}" is too close to the existing slug "${clash.slug}"; choose another.` });
  }
  return out;
}

/**
 * A user's name as a mail quotes it (the invitation, the welcome): one line, at most 60 characters,
 * and no web or e-mail address, else the fallback. A name is free text at sign-up, and a mail the
 * server sends to someone else's address must not carry the sender's link.
 */
export function nameForMail(name: string, fallback: string): string {
  const one = name.replace(/[\r\n\t]+/g, ' ').trim().slice(0, 60);
  return one && !WEB_ADDRESS.test(one) ? one : fallback;
}

/** How many teams the user leads (owner role). */
export async function teamsLedBy(db: Db, userId: string): Promise<number> {
  const [r] = await db.select({ n: count() }).from(member).where(and(eq(member.userId, userId), eq(member.role, 'owner')));
  return Number(r.n);
}

export interface TeamLimits { teamsPerUser: number; invitesPerSenderPerHour: number; invitesPerRecipientPerDay: number }

/** Why this invitation mail may not go out now, or null. Counts the mails already sent (mail_quota). */
export async function invitationRefusal(db: Db, limits: TeamLimits, p: { senderId: string; recipient: string; now: Date }): Promise<{ message: string; retryAfterS: number } | null> {
  const hourAgo = new Date(p.now.getTime() - 3600_000);
  const dayAgo = new Date(p.now.getTime() - 86_400_000);
  const [bySender] = await db.select({ n: count() }).from(mailQuota)
    .where(and(eq(mailQuota.kind, 'invitation'), eq(mailQuota.senderId, p.senderId), gt(mailQuota.at, hourAgo)));
  if (Number(bySender.n) >= limits.invitesPerSenderPerHour) {
    return { message: `You have sent ${limits.invitesPerSenderPerHour} invitations in the last hour, the limit; wait and try again.`, retryAfterS: 3600 };
  }
  const [byRecipient] = await db.select({ n: count() }).from(mailQuota)
    .where(and(eq(mailQuota.kind, 'invitation'), eq(mailQuota.recipient, p.recipient.trim().toLowerCase()), gt(mailQuota.at, dayAgo)));
  if (Number(byRecipient.n) >= limits.invitesPerRecipientPerDay) {
    return { message: `This address has received ${limits.invitesPerRecipientPerDay} invitations in the last 24 hours, the limit; try again tomorrow.`, retryAfterS: 86_400 };
  }
  return null;
}

/** Counts one invitation mail (called where the mail is queued). */
export async function recordInvitationMail(db: Db, p: { senderId: string; recipient: string; now: Date }): Promise<void> {
  // rows older than the longest window count for nothing any more
  await db.delete(mailQuota).where(lt(mailQuota.at, new Date(p.now.getTime() - 86_400_000)));
  await db.insert(mailQuota).values({ kind: 'invitation', senderId: p.senderId, recipient: p.recipient.trim().toLowerCase(), at: p.now });
}
