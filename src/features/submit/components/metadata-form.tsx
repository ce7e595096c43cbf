/**
 * The entry's metadata: label, track, method (family, description, settings as key/value rows),
 * resources, links, licence and notes. Every field shows the dry run's message for its pointer.
 */
import type { ReactNode } from 'react';
import { Button, Field, SelectField, TextAreaField, cx, inputClass } from '@/components/ui';
import {
  FAMILY_LABELS, LIMITS, LINK_FIELDS, LINK_LABELS, METHOD_FAMILIES, RESOURCE_FIELDS, RESOURCE_LABELS, TRACKS, TRACK_LABELS, rowId,
  type EntryForm,
} from '../lib/entry-form';

const LICENCES = ['CC-BY-4.0', 'CC0-1.0', 'CC-BY-SA-4.0', 'MIT', 'Apache-2.0'];

/** a wrapper whose id the problem list jumps to */
const At = ({ field, children, className }: { field: string; children: ReactNode; className?: string }) => (
  <div id={`f-${field.replace(/[^a-zA-Z0-9-]/g, '-')}`} className={className}>{children}</div>
);

export function MetadataForm({ form, set, errorFor }: { form: EntryForm; set: (patch: Partial<EntryForm>, touched?: string) => void; errorFor: (field: string) => string | undefined }) {
  const settingsErr = errorFor('settings');
  return (
    <div className="space-y-6">
      <div className="grid gap-4 sm:grid-cols-2">
        <At field="label" className="sm:col-span-2">
          <Field label="Label" hint="A short name for this method configuration, shown in the standings." value={form.label} maxLength={LIMITS.label} error={errorFor('label')} onChange={(e) => set({ label: e.target.value }, 'label')} />
        </At>
        <At field="track">
          <SelectField label="Track" value={form.track} error={errorFor('track')} onChange={(e) => set({ track: e.target.value }, 'track')}>
            {!TRACKS.includes(form.track) && <option value={form.track}>{form.track ? `${form.track} (not a track)` : 'choose a track…'}</option>}
            {TRACKS.map((t) => <option key={t} value={t}>{TRACK_LABELS[t] ?? t}</option>)}
          </SelectField>
        </At>
        <At field="family">
          <SelectField label="Method family" value={form.family} error={errorFor('family')} onChange={(e) => set({ family: e.target.value }, 'family')}>
            {/* a misspelt family is shown as it is, never as another family */}
            {!METHOD_FAMILIES.includes(form.family) && <option value={form.family}>{form.family ? `${form.family} (not a method family)` : 'choose a method family…'}</option>}
            {METHOD_FAMILIES.map((t) => <option key={t} value={t}>{FAMILY_LABELS[t] ?? t}</option>)}
          </SelectField>
        </At>
        <At field="description" className="sm:col-span-2">
          <TextAreaField label="Method description" rows={3} maxLength={LIMITS.description} value={form.description} error={errorFor('description')} onChange={(e) => set({ description: e.target.value }, 'description')} hint="How the estimates were made: enough for another team to reproduce them." />
        </At>
      </div>

      <fieldset id="f-settings" className="min-w-0 space-y-2">
        <legend className="text-sm font-medium">Method settings</legend>
        <p className="text-sm text-ink-soft">Bond dimension, truncation threshold, noise-scale factors, shots… Numbers and true/false are stored as such; a list as [1, 3, 5].</p>
        {form.settings.map((s, i) => {
          const err = errorFor(`settings/${s.key.trim()}`);
          const update = (patch: Partial<typeof s>) => set({ settings: form.settings.map((x, j) => (j === i ? { ...x, ...patch } : x)) }, `settings/${s.key.trim()}`);
          return (
            <div key={s.id} id={`f-settings-${s.key.trim().replace(/[^a-zA-Z0-9-]/g, '-')}`}>
              <div className="flex gap-2">
                <input aria-label={`Setting ${i + 1} name`} placeholder="name" value={s.key} onChange={(e) => update({ key: e.target.value })} className={inputClass(Boolean(err), 'w-32 font-mono sm:w-56', true)} />
                <input aria-label={`Setting ${i + 1} value`} placeholder="value" value={s.value} onChange={(e) => update({ value: e.target.value })} className={inputClass(Boolean(err), 'min-w-0 flex-1 font-mono', true)} />
                <Button size="sm" variant="ghost" aria-label={`Remove setting ${i + 1}`} onClick={() => set({ settings: form.settings.filter((_, j) => j !== i) })}>Remove</Button>
              </div>
              {err && <p className="mt-1 text-sm text-danger">{err}</p>}
            </div>
          );
        })}
        {settingsErr && <p className="text-sm text-danger">{settingsErr}</p>}
        <Button size="sm" variant="secondary" disabled={form.settings.length >= LIMITS.settings} onClick={() => set({ settings: [...form.settings, { id: rowId(), key: '', value: '' }] })}>Add a setting</Button>
      </fieldset>

      <fieldset className="min-w-0 space-y-2">
        <legend className="text-sm font-medium">Resources</legend>
        <div className="grid grid-cols-2 gap-3 sm:grid-cols-3">
          {RESOURCE_FIELDS.map((r) => (
            <At key={r.key} field={`resources/${r.key}`}>
              <Field
                label={RESOURCE_LABELS[r.key] ?? r.key}
                inputMode={r.numeric ? 'decimal' : undefined}
                className={cx(r.numeric && 'num')}
                maxLength={r.maxLength}
                value={form.resources[r.key] ?? ''}
                error={errorFor(`resources/${r.key}`)}
                onChange={(e) => set({ resources: { ...form.resources, [r.key]: e.target.value } }, `resources/${r.key}`)}
              />
            </At>
          ))}
        </div>
      </fieldset>

      <fieldset className="min-w-0 space-y-2">
        <legend className="text-sm font-medium">Links and licence</legend>
        <div className="grid gap-3 sm:grid-cols-2">
          {LINK_FIELDS.map((k) => (
            <At key={k} field={`links/${k}`}>
              <Field label={LINK_LABELS[k] ?? k} value={form.links[k] ?? ''} placeholder={k === 'doi' ? '10.1103/…' : 'https://'} error={errorFor(`links/${k}`)} onChange={(e) => set({ links: { ...form.links, [k]: e.target.value } }, `links/${k}`)} />
            </At>
          ))}
          <At field="license">
            <Field label="Licence of the data" list="licences" maxLength={LIMITS.license} value={form.license} error={errorFor('license')} onChange={(e) => set({ license: e.target.value }, 'license')} hint="An SPDX identifier, e.g. CC-BY-4.0." />
            <datalist id="licences">{LICENCES.map((l) => <option key={l} value={l} />)}</datalist>
          </At>
        </div>
        <At field="notes">
          <TextAreaField label="Notes" rows={2} maxLength={LIMITS.notes} value={form.notes} error={errorFor('notes')} onChange={(e) => set({ notes: e.target.value }, 'notes')} />
        </At>
      </fieldset>
    </div>
  );
}
