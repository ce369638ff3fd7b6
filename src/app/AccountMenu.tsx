import { useEffect, useRef, useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { useMe } from '../lib/currentUser';
import { useSignOut } from '../features/auth/api/session';

export function AccountMenu() {
  const me = useMe();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const [open, setOpen] = useState(false);
  const menuRef = useRef<HTMLDivElement>(null);

  useEffect(() => {
    if (!open) return;
    const close = (event: MouseEvent | KeyboardEvent) => {
      if (event instanceof KeyboardEvent ? event.key === 'Escape' : !menuRef.current?.contains(event.target as Node)) {
        setOpen(false);
      }
    };
    document.addEventListener('mousedown', close);
    document.addEventListener('keydown', close);
    return () => {
      document.removeEventListener('mousedown', close);
      document.removeEventListener('keydown', close);
    };
  }, [open]);

  if (!me.data) return null;
  const { user } = me.data;

  return (
    <div className="relative" ref={menuRef}>
      <button
        type="button"
        aria-haspopup="menu"
        aria-expanded={open}
        onClick={() => setOpen((value) => !value)}
        className="flex items-center gap-2 text-sm text-ink-soft hover:text-ink"
      >
        <span className="max-w-[8rem] truncate sm:max-w-[12rem]">{user.name}</span>
        <span aria-hidden className="text-[0.625rem]">{open ? '▲' : '▼'}</span>
      </button>
      {open && (
        <div role="menu" className="absolute right-0 z-10 mt-2 w-60 border border-rule bg-paper py-1 shadow-[0_2px_8px_rgba(29,27,34,0.08)]">
          <p className="truncate border-b border-rule px-4 py-2 text-xs text-ink-faint">{user.email}</p>
          <Link role="menuitem" to="/account" onClick={() => setOpen(false)} className="block px-4 py-2 text-sm hover:bg-paper-deep">
            Account
          </Link>
          <button
            type="button"
            role="menuitem"
            disabled={signOut.isPending}
            onClick={() =>
              signOut.mutate(undefined, {
                onSettled: () => navigate('/signin', { replace: true }),
              })
            }
            className="block w-full px-4 py-2 text-left text-sm hover:bg-paper-deep"
          >
            {signOut.isPending ? 'Signing out…' : 'Sign out'}
          </button>
        </div>
      )}
    </div>
  );
}
