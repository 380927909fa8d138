import { describe, expect, it } from 'vitest';
import { currentOf } from '@/components/ui/main-nav';

const links = [
  { href: '/', label: 'Start' },
  { href: '/fleet', label: 'Fleet' },
  { href: '/fleet/customers', label: 'Customers' },
  { href: '/visits', label: 'Visits' },
];

describe('the main navigation’s current section', () => {
  it('is the link whose path is the longest prefix of the page’s, by whole segments', () => {
    expect(currentOf(links, '/')).toBe('/');
    expect(currentOf(links, '/fleet')).toBe('/fleet');
    expect(currentOf(links, '/fleet/machines/42')).toBe('/fleet');
    expect(currentOf(links, '/fleet/customers/7')).toBe('/fleet/customers');
    expect(currentOf(links, '/visits/3')).toBe('/visits');
  });

  it('marks nothing for a page outside every section, and no prefix inside a segment', () => {
    expect(currentOf(links, '/sessions/9/field')).toBeNull();
    expect(currentOf(links, '/fleetwide')).toBeNull();
  });
});
