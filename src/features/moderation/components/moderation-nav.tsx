import { NavLink } from 'react-router';
import { cx } from '@/components/ui';

const links = [
  { to: '/moderation', label: 'Review queue', end: true },
  { to: '/moderation/challenges', label: 'Challenges', end: false },
  { to: '/moderation/audit', label: 'Audit log', end: true },
];

/** the moderators' sections: one page each, so that each has its own address */
export function ModerationNav() {
  return (
    <nav aria-label="Moderation" className="-mx-4 mb-6 flex gap-1 overflow-x-auto border-b border-rule px-4 sm:mx-0 sm:px-0">
      {links.map((l) => (
        <NavLink key={l.to} to={l.to} end={l.end} className={({ isActive }) => cx('-mb-px border-b-2 px-3 py-2 text-sm whitespace-nowrap no-underline', isActive ? 'border-ink font-medium text-ink' : 'border-transparent text-ink-soft hover:text-ink')}>
          {l.label}
        </NavLink>
      ))}
    </nav>
  );
}
