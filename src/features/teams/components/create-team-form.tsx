import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { slugify, useCreateTeam } from '@/features/teams/api/create-team';
import type { Track } from '@/features/teams/api/get-teams';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Button, Field, FormMessage, TextAreaField, TrackMark, TRACK_LABEL, cx } from '@/components/ui';
import { TRACKS } from '@shared/vocabulary';

export function CreateTeamForm() {
  const navigate = useNavigate();
  const [name, setName] = useState('');
  const [slug, setSlug] = useState('');
  const [slugEdited, setSlugEdited] = useState(false);
  const [track, setTrack] = useState<Track>('classical');
  const [description, setDescription] = useState('');
  const [errors, setErrors] = useState<{ name?: string; slug?: string }>({});
  const m = useCreateTeam();

  const effectiveSlug = slugEdited ? slug : slugify(name);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs: typeof errors = {};
    if (name.trim().length < 2) errs.name = 'Give the team a name of at least 2 characters.';
    if (!/^[a-z0-9]+(?:-[a-z0-9]+)*$/.test(effectiveSlug)) errs.slug = 'Use lower-case letters, digits and single hyphens, e.g. cobalt-qubit-lab.';
    setErrors(errs);
    if (errs.name || errs.slug) return;
    m.mutate(
      { name: name.trim(), slug: effectiveSlug, track, description: description.trim() },
      { onSuccess: (team) => navigate(`/teams/${(team as { id: string }).id}`) },
    );
  };

  const err = m.error instanceof ApiError ? m.error : null;
  const slugServer = err && /SLUG|ALREADY_EXISTS/.test(err.code) ? err.message : undefined;

  return (
    <form noValidate onSubmit={submit} className="space-y-4" aria-label="Create a team">
      <Field label="Team name" value={name} onChange={(e) => setName(e.target.value)} error={errors.name} maxLength={80} placeholder="e.g. Lattice Ledger" />
      <Field
        label="Slug"
        value={effectiveSlug}
        onChange={(e) => { setSlugEdited(true); setSlug(e.target.value.toLowerCase()); }}
        hint="The short name in links and exports; made from the name, you can change it."
        error={errors.slug ?? slugServer}
        maxLength={48}
      />
      <fieldset>
        <legend className="mb-1 text-sm font-medium">Track</legend>
        <div className="grid gap-2 sm:grid-cols-2 lg:grid-cols-1">
          {TRACKS.map((t) => (
            <label
              key={t}
              className={cx(
                'flex cursor-pointer items-center gap-2 rounded border px-3 py-2 text-sm has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-offset-2 has-[:focus-visible]:outline-focus',
                track === t ? (t === 'hardware' ? 'border-hardware bg-hardware-soft' : 'border-classical bg-classical-soft') : 'border-rule-strong bg-paper-raised',
              )}
            >
              <input type="radio" name="track" value={t} checked={track === t} onChange={() => setTrack(t)} className="sr-only" />
              <TrackMark track={t} />
              {TRACK_LABEL[t]}
            </label>
          ))}
        </div>
      </fieldset>
      <TextAreaField label="Description (optional)" rows={3} value={description} onChange={(e) => setDescription(e.target.value)} maxLength={500} hint="Methods, devices, affiliations: one or two sentences." />
      {m.isError && !slugServer && <FormMessage>{errorMessage(m.error)}</FormMessage>}
      <Button type="submit" busy={m.isPending}>Create the team</Button>
    </form>
  );
}
