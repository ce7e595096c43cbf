/** A team's metadata (organization.metadata, JSON text): its track (kind) and description. */
export const teamMeta = (m: string | null): { track?: string; description?: string } => {
  try { const v = m ? JSON.parse(m) : {}; return v && typeof v === 'object' ? v : {}; } catch { return {}; }
};

/** The track a team's new entries default to: its kind when that is a track, else classical. */
export const teamTrack = (m: string | null): 'hardware' | 'classical' => (teamMeta(m).track === 'hardware' ? 'hardware' : 'classical');
