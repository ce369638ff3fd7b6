import { Suspense } from 'react';
import { NavLink, Outlet } from 'react-router';
import { roleAllows } from '@shared/roles';
import { useRole } from '../lib/permissions';
import { AccountMenu } from './AccountMenu';
import { navigation } from './navigation';
import { TeamSwitcher } from './TeamSwitcher';
import { Loading } from '../ui/States';

export function AppShell() {
  const role = useRole();
  const items = navigation.filter((item) => role !== null && roleAllows(role, item.permission));

  return (
    <div className="min-h-screen bg-paper text-ink">
      <header className="border-b border-rule">
        <div className="mx-auto flex max-w-6xl items-center gap-8 px-6 py-3">
          <NavLink to="/" className="text-base font-semibold tracking-[0.2em] uppercase">
            Tacet
          </NavLink>
          <TeamSwitcher />
          <nav aria-label="Main" className="flex flex-1 items-center gap-6">
            {items.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                title={item.description}
                className={({ isActive }) =>
                  `-mb-[0.8125rem] border-b-2 pb-3 text-sm ${
                    isActive ? 'border-accent text-ink' : 'border-transparent text-ink-soft hover:text-ink'
                  }`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <AccountMenu />
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-6 pt-10 pb-20">
        <Suspense fallback={<Loading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
