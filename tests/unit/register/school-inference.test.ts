import { describe, expect, it } from 'vitest';
import { phaseFromName, postcodeIn, regionFromPostcode } from '~/lib/engine/school-inference';

// Phases of education as the Department for Education's "Get Information about Schools" register names them; which
// words signal which phase is common practice, no single source. The school names are invented.
describe('the phase a school name states', () => {
  it.each([
    ['Oakfield Primary School', 'primary'],
    ['Brookside Infant Academy', 'primary'],
    ['Larchwood Junior Academy', 'primary'],
    ['St Ives Road C of E Infants', 'primary'],
    ['Millbrook First School', 'primary'],
    ['Hartley High School', 'secondary'],
    ['Fernhill Secondary Academy', 'secondary'],
    ['Kingsmead School and Sixth Form', 'secondary'],
    ['Ashdown Academy Sixth Form', 'secondary'],
    ['Riverside Sixth Form College', 'further_education'],
    ['Northgate All-Through Academy', 'all_through'],
    ['Willow Bank Special School', 'special'],
    ['Little Acorns Nursery School', 'nursery'],
  ])('reads %s as %s', (name, phase) => {
    expect(phaseFromName(name)?.phase).toBe(phase);
  });

  it.each(['Oakfield Academy', 'Hartley Park', 'The Meadows', 'Fernhill College'])(
    'says nothing about %s, which could be any phase',
    (name) => {
      expect(phaseFromName(name)).toBeNull();
    },
  );

  it('names the words it relied on', () => {
    expect(phaseFromName('Hartley High School')?.because).toBe('High School');
  });
});

// Royal Mail postcode areas and the region each mostly lies in: from memory (the areas are public knowledge; the
// assignment of boundary areas is ours).
describe('the climate region a postcode gives', () => {
  it.each([
    ['LS6 2AB', 'north_east', 'LS'],
    ['M14 5RT', 'north_west', 'M'],
    ['B15 2TT', 'midlands', 'B'],
    ['EX4 4QJ', 'south_west', 'EX'],
    ['NR4 7TJ', 'east_anglia', 'NR'],
    ['CF10 3AT', 'wales', 'CF'],
    ['EH8 9YL', 'scotland', 'EH'],
    ['BT7 1NN', 'northern_ireland', 'BT'],
    ['SW1A 1AA', 'london_south_east', 'SW'],
    ['12 Mill Lane, Leeds ls6 2ab', 'north_east', 'LS'],
    ['ls6', 'north_east', 'LS'],
  ])('reads %s as %s', (postcode, region, area) => {
    expect(regionFromPostcode(postcode)).toEqual({ climateRegion: region, area });
  });

  it.each(['Unit B2, Mill Lane', 'Oakfield Primary', 'JE2 4WE', ''])('finds no region in "%s"', (text) => {
    expect(regionFromPostcode(text)).toBeNull();
  });

  it('writes a postcode found in an address the usual way', () => {
    expect(postcodeIn('12 Mill Lane, Leeds ls62ab')).toBe('LS6 2AB');
    expect(postcodeIn('no postcode here')).toBeNull();
  });
});
