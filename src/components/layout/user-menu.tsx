import { useEffect, useRef, useState } from 'react';
import { Link, useLocation, useNavigate } from 'react-router';
import { useQueryClient } from '@tanstack/react-query';
import type { MeTeam, MeUser } from '@/features/me/api/get-me';
import { signOut } from '@/features/auth/api/sign-out';
import { cx } from '@/components/ui';

const item = 'block px-3 py-2 text-sm no-underline hover:bg-paper-sunk';

export function UserMenu({ user, teams }: { user: MeUser; teams: MeTeam[] }) {
  const [open, setOpen] = useState(false);
  const ref = useRef<HTMLDivElement>(null);
  const location = useLocation();
  const navigate = useNavigate();
  const qc = useQueryClient();

  useEffect(() => setOpen(false), [location.pathname]);
  useEffect(() => {
    if (!open) return;
    const onDoc = (e: MouseEvent) => { if (!ref.current?.contains(e.target as Node)) setOpen(false); };
    const onKey = (e: KeyboardEvent) => { if (e.key === 'Escape') setOpen(false); };
    document.addEventListener('mousedown', onDoc);
    document.addEventListener('keydown', onKey);
    return () => { document.removeEventListener('mousedown', onDoc); document.removeEventListener('keydown', onKey); };
  }, [open]);

  const initials = user.name.split(/\s+/).filter(Boolean).slice(0, 2).map((w) => w[0]?.toUpperCase()).join('') || '?';

  return (
    <div className="relative" ref={ref}>
      <button
        type="button"
        aria-haspopup="menu"
        aria-expanded={open}
        onClick={() => setOpen((o) => !o)}
        className="flex h-9 items-center gap-2 rounded px-1.5 hover:bg-paper-sunk sm:px-2"
        data-testid="user-menu-button"
      >
        <span aria-hidden="true" className="grid size-7 place-items-center rounded-full border border-rule-strong bg-paper-raised text-xs font-semibold">
          {initials}
        </span>
        <span className="hidden max-w-40 truncate text-sm sm:inline">{user.name}</span>
        <span className="sr-only">Account menu for {user.name}</span>
        <svg width="10" height="10" viewBox="0 0 10 10" aria-hidden="true" className={cx('text-ink-soft transition-transform', open && 'rotate-180')}>
          <path d="M1.5 3.5 5 7l3.5-3.5" fill="none" stroke="currentColor" strokeWidth="1.5" />
        </svg>
      </button>
      {open && (
        <div role="menu" className="absolute right-0 z-20 mt-1 w-64 overflow-hidden rounded-card border border-rule bg-paper-raised py-1 shadow-lg shadow-ink/10">
          <div className="border-b border-rule px-3 pt-1 pb-2">
            <p className="truncate text-sm font-medium">{user.name}</p>
            <p className="truncate text-xs text-ink-soft">{user.email}</p>
          </div>
          <Link role="menuitem" to="/account" className={item}>Account</Link>
          {teams.length > 0 && <Link role="menuitem" to="/my-entries" className={item}>My entries</Link>}
          {teams.length > 0 && (
            <div className="border-t border-rule py-1">
              <p className="px-3 pt-1 text-xs text-ink-faint">Your teams</p>
              {teams.map((t) => (
                <Link key={t.id} role="menuitem" to={`/teams/${t.id}`} className={cx(item, 'flex justify-between gap-2')}>
                  <span className="truncate">{t.name}</span>
                  <span className="text-xs text-ink-faint">{t.role}</span>
                </Link>
              ))}
            </div>
          )}
          {(user.role === 'moderator' || user.role === 'admin') && (
            <div className="border-t border-rule py-1">
              <Link role="menuitem" to="/moderation" className={item}>Moderation</Link>
              {user.role === 'admin' && <Link role="menuitem" to="/admin" className={item}>Admin</Link>}
              {user.role === 'admin' && <Link role="menuitem" to="/admin/outbox" className={item}>Outbox</Link>}
            </div>
          )}
          <div className="border-t border-rule pt-1">
            <button
              role="menuitem"
              type="button"
              className={cx(item, 'w-full text-left')}
              onClick={async () => {
                await signOut(qc);
                navigate('/');
              }}
            >
              Sign out
            </button>
          </div>
        </div>
      )}
    </div>
  );
}
