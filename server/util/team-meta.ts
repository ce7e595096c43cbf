/**
 * The track a team's new entries default to: its kind when that is a track, else classical. The
 * metadata is read by the one reader of team metadata (readTeamMetadata in services/team-rules.ts),
 * which takes only typed, limited fields.
 */
import { readTeamMetadata } from '../services/team-rules';
import type { Track } from '@shared/vocabulary';

export const teamTrack = (m: string | null): Track => (readTeamMetadata(m).track === 'hardware' ? 'hardware' : 'classical');
