import { NavLink, Outlet } from 'react-router-dom';
import { paths } from '../../config/paths';
import { useMe } from '../../features/auth/api/get-me';
import { UserMenu } from '../../features/auth/components/user-menu';
import { mayOpen, type Screen } from '../../features/auth/permissions';
import { HealthBadge } from '../../features/health/components/health-badge';
import { ClinicalCaution } from './clinical-caution';

/** Main navigation; `screen` names the access rule (features/auth/permissions.ts), none = public. */
const navigation: Array<{ to: string; label: string; end?: boolean; screen?: Screen }> = [
  { to: paths.caseload.getHref(), label: 'Caseload', end: true, screen: 'caseload' },
  { to: paths.patients.getHref(), label: 'Patients', screen: 'patients' },
  { to: paths.reviews.getHref(), label: 'Review queue', screen: 'reviews' },
  { to: paths.teaching.getHref(), label: 'Teaching cases', screen: 'teaching' },
  { to: paths.drugModels.getHref(), label: 'Drug models', screen: 'drugModels' },
  { to: paths.users.getHref(), label: 'Users', screen: 'users' },
  { to: paths.audit.getHref(), label: 'Audit trail', screen: 'audit' },
  { to: paths.status.getHref(), label: 'System status' },
];

export function AppShell() {
  const me = useMe();
  const role = me.data?.role;
  const items = navigation.filter((item) => !item.screen || mayOpen(role, item.screen));
  return (
    <div className="flex min-h-screen flex-col font-sans">
      <header className="bg-tide-800 text-white">
        <div className="flex items-center justify-between gap-4 px-4 py-3">
          <div className="flex items-baseline gap-3">
            <span className="text-lg font-bold tracking-tight">Ebbtide</span>
            <span className="text-sm text-tide-100">Kestrel Bay Regional Hospital · Pharmacy</span>
          </div>
          <div className="flex items-center gap-4">
            <HealthBadge />
            <UserMenu />
          </div>
        </div>
        <nav aria-label="Main" className="flex flex-wrap gap-1 px-2 pb-2">
          {items.map((item) => (
            <NavLink
              key={item.to}
              to={item.to}
              end={item.end}
              className={({ isActive }) =>
                `rounded px-3 py-1.5 text-sm focus:outline-none focus-visible:ring-2 focus-visible:ring-white ${
                  isActive
                    ? 'bg-white text-tide-800 font-semibold'
                    : 'text-tide-50 hover:bg-tide-700'
                }`
              }
            >
              {item.label}
            </NavLink>
          ))}
        </nav>
      </header>
      <ClinicalCaution />
      <main className="flex-1 px-4 py-6">
        <Outlet />
      </main>
      <footer className="border-t border-slate-200 px-4 py-2 text-xs text-slate-500">
        Ebbtide · invented demo data only · results are checked and countersigned by pharmacists
      </footer>
    </div>
  );
}
