/** The page shell's navigation. Only screens that exist are listed, so there are no dead links. */
export interface NavItem {
  href: string;
  label: string;
  /** Shown only to signed-in users when true; only to signed-out users when 'signed-out'. */
  audience: 'all' | 'signed-in' | 'signed-out';
  /**
   * False: left out of a signed-in user's desktop bar, so the bar stays one row at 1024 px and up. The crew's name
   * beside the brand links to the crew page, and the rules page is linked from the footer; the phone menu lists all.
   */
  inSignedInBar?: false;
}

export const NAV_ITEMS: NavItem[] = [
  { href: '/', label: 'Home', audience: 'all' },
  { href: '/machines', label: 'Machines', audience: 'signed-in' },
  { href: '/samples', label: 'Samples', audience: 'signed-in' },
  { href: '/overview', label: 'Overview', audience: 'signed-in' },
  { href: '/imports', label: 'Lab import', audience: 'signed-in' },
  { href: '/crews', label: 'Crew', audience: 'signed-in', inSignedInBar: false },
  { href: '/tools', label: 'Oil tools', audience: 'all' },
  { href: '/rules', label: 'How calls are made', audience: 'all', inSignedInBar: false },
  { href: '/account', label: 'Account', audience: 'signed-in' },
  { href: '/sign-in', label: 'Sign in', audience: 'signed-out' },
  { href: '/sign-up', label: 'Sign up', audience: 'signed-out' },
];

/** The items a visitor sees, and which one is current. */
export function navFor(pathname: string, signedIn: boolean): (NavItem & { current: boolean })[] {
  return NAV_ITEMS.filter((i) => i.audience === 'all' || (i.audience === 'signed-in') === signedIn).map((i) => ({
    ...i,
    current: i.href === '/' ? pathname === '/' : pathname === i.href || pathname.startsWith(`${i.href}/`),
  }));
}

/** The desktop bar's items: every item of the menu but those a signed-in bar leaves out. */
export function barNavFor(pathname: string, signedIn: boolean): (NavItem & { current: boolean })[] {
  return navFor(pathname, signedIn).filter((i) => !signedIn || i.inSignedInBar !== false);
}
