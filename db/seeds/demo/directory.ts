/**
 * The demo contractor's book of business: 12 invented clients, 20 sites and their gates.
 * Every name, street and town is made up; e-mails use the reserved `.test` domain.
 * `condition` says how the demo walk should find the gate (see walk.ts).
 */
export type GateCondition = 'sound' | 'needs_work' | 'dangerous';

export interface DemoGate {
  label: string;
  kind: 'swing' | 'slide';
  leaves: 'single' | 'double';
  openingDirection?: 'pull_to_open' | 'push_to_open';
  width: { value: number; unit: 'ft' | 'mm' };
  height: { value: number; unit: 'ft' | 'mm' };
  weight: { value: number; unit: 'lb' | 'kg' };
  operatorManufacturedOn: string;
  installedOn: string;
  automaticClosing: boolean;
  /**
   * The auditor listed an edge where the photo-eye is and still answered that the photo-eye
   * reverses the gate: accepted by older versions, a contradiction to resolve from 2026.2.
   */
  photoEyeNotListed?: boolean;
}

export interface DemoSite {
  name: string | null;
  addressLine1: string;
  city: string;
  region: string;
  postalCode: string;
  usageClass: 1 | 2 | 3;
  notes?: string;
  context: {
    pedestriansUseDriveway: boolean;
    childrenOrPetsPresent: boolean;
    publicAccess: boolean;
    slopeAcrossSwing: boolean;
  };
  gates: DemoGate[];
}

export interface DemoClient {
  name: string;
  kind: 'homeowner' | 'property_manager' | 'business';
  contactEmail: string;
  phone: string;
  sites: DemoSite[];
}

const family = {
  pedestriansUseDriveway: true,
  childrenOrPetsPresent: true,
  publicAccess: false,
  slopeAcrossSwing: false,
};
const quiet = {
  pedestriansUseDriveway: false,
  childrenOrPetsPresent: false,
  publicAccess: false,
  slopeAcrossSwing: false,
};
const publicLot = {
  pedestriansUseDriveway: true,
  childrenOrPetsPresent: false,
  publicAccess: true,
  slopeAcrossSwing: false,
};

const swing = (
  label: string,
  leaves: 'single' | 'double',
  openingDirection: 'pull_to_open' | 'push_to_open',
  widthFt: number,
  madeOn: string,
  extra: Partial<DemoGate> = {},
): DemoGate => ({
  label,
  kind: 'swing',
  leaves,
  openingDirection,
  width: { value: widthFt, unit: 'ft' },
  height: { value: 5, unit: 'ft' },
  weight: { value: leaves === 'double' ? 180 : 260, unit: 'lb' },
  operatorManufacturedOn: madeOn,
  installedOn: madeOn,
  automaticClosing: false,
  ...extra,
});

const slide = (label: string, widthFt: number, madeOn: string, extra: Partial<DemoGate> = {}): DemoGate => ({
  label,
  kind: 'slide',
  leaves: 'single',
  width: { value: widthFt, unit: 'ft' },
  height: { value: 6, unit: 'ft' },
  weight: { value: 620, unit: 'lb' },
  operatorManufacturedOn: madeOn,
  installedOn: madeOn,
  automaticClosing: true,
  ...extra,
});

export const demoClients: DemoClient[] = [
  {
    name: 'Wren & Alder Household',
    kind: 'homeowner',
    contactEmail: 'homeowner@example.test',
    phone: '+1 555 0100',
    sites: [
      {
        name: 'Home',
        addressLine1: '14 Thistlecombe Lane',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80999',
        usageClass: 1,
        context: family,
        gates: [
          swing('Driveway gate', 'double', 'pull_to_open', 14, '2019-05-01', { photoEyeNotListed: true }),
        ],
      },
    ],
  },
  {
    name: 'Halloway Family',
    kind: 'homeowner',
    contactEmail: 'halloway@example.test',
    phone: '+1 555 0101',
    sites: [
      {
        name: null,
        addressLine1: '3 Quarry Bend',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80998',
        usageClass: 1,
        context: family,
        gates: [swing('Front gate', 'single', 'pull_to_open', 12, '2014-08-11')],
      },
    ],
  },
  {
    name: 'Ostrander Residence',
    kind: 'homeowner',
    contactEmail: 'ostrander@example.test',
    phone: '+1 555 0102',
    sites: [
      {
        name: null,
        addressLine1: '88 Larchmere Road',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80997',
        usageClass: 1,
        context: { ...family, slopeAcrossSwing: true },
        gates: [swing('Courtyard gate', 'double', 'push_to_open', 16, '2021-03-02')],
      },
    ],
  },
  {
    name: 'Mirelle Quint',
    kind: 'homeowner',
    contactEmail: 'quint@example.test',
    phone: '+1 555 0103',
    sites: [
      {
        name: 'Paddock entrance',
        addressLine1: '1 Saddleback Track',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80997',
        usageClass: 1,
        context: quiet,
        gates: [slide('Paddock slide gate', 18, '2017-06-20')],
      },
      {
        name: 'Cottage',
        addressLine1: '3 Saddleback Track',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80997',
        usageClass: 1,
        context: family,
        gates: [swing('Cottage gate', 'single', 'push_to_open', 9, '2025-04-10')],
      },
    ],
  },
  {
    name: 'Daventry-Oakes Household',
    kind: 'homeowner',
    contactEmail: 'daventry@example.test',
    phone: '+1 555 0104',
    sites: [
      {
        name: null,
        addressLine1: '27 Fennick Close',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80999',
        usageClass: 1,
        context: family,
        gates: [swing('Driveway gate', 'single', 'pull_to_open', 10, '2023-09-14')],
      },
    ],
  },
  {
    name: 'Brannock Residence',
    kind: 'homeowner',
    contactEmail: 'brannock@example.test',
    phone: '+1 555 0105',
    sites: [
      {
        name: null,
        addressLine1: '402 Upper Millrace',
        city: 'Ketterby',
        region: 'CO',
        postalCode: '80996',
        usageClass: 1,
        context: family,
        gates: [slide('Driveway slide gate', 16, '2015-02-27')],
      },
    ],
  },
  {
    name: 'Sefton Hollow Homes',
    kind: 'homeowner',
    contactEmail: 'sefton@example.test',
    phone: '+1 555 0106',
    sites: [
      {
        name: 'Main house',
        addressLine1: '9 Sefton Hollow',
        city: 'Ketterby',
        region: 'CO',
        postalCode: '80996',
        usageClass: 1,
        context: family,
        gates: [swing('Main gate', 'double', 'pull_to_open', 15, '2020-11-05')],
      },
      {
        name: 'Barn',
        addressLine1: '9A Sefton Hollow',
        city: 'Ketterby',
        region: 'CO',
        postalCode: '80996',
        usageClass: 1,
        context: quiet,
        gates: [swing('Barn gate', 'single', 'push_to_open', 12, '2012-04-18')],
      },
    ],
  },
  {
    name: 'Larkhill Terrace Owners (managed by Cobblestone Lane Property Care)',
    kind: 'property_manager',
    contactEmail: 'manager@example.test',
    phone: '+1 555 0150',
    sites: [
      {
        name: 'Larkhill Terrace — vehicle entrance',
        addressLine1: '200 Larkhill Terrace',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80995',
        usageClass: 2,
        notes: '40-unit complex; residents and visitors use the entrance all day.',
        context: publicLot,
        gates: [slide('Entry slide gate', 22, '2018-07-30'), slide('Exit slide gate', 22, '2018-07-30')],
      },
      {
        name: 'Larkhill Terrace — pool gate court',
        addressLine1: '204 Larkhill Terrace',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80995',
        usageClass: 2,
        context: { ...publicLot, childrenOrPetsPresent: true },
        gates: [
          swing('Service court gate', 'single', 'pull_to_open', 12, '2016-05-09', { automaticClosing: true }),
        ],
      },
      {
        name: 'Larkhill Terrace — garages',
        addressLine1: '210 Larkhill Terrace',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80995',
        usageClass: 2,
        context: publicLot,
        gates: [
          swing('Garage court gate', 'double', 'pull_to_open', 18, '2024-02-12', { automaticClosing: true }),
        ],
      },
    ],
  },
  {
    name: 'Brightwater Joinery',
    kind: 'business',
    contactEmail: 'yard@brightwater.test',
    phone: '+1 555 0170',
    sites: [
      {
        name: 'Timber yard',
        addressLine1: '5 Tannery Wharf',
        city: 'Ketterby',
        region: 'CO',
        postalCode: '80994',
        usageClass: 3,
        notes: 'Staff only; deliveries by appointment.',
        context: quiet,
        gates: [slide('Yard gate', 26, '2013-10-01')],
      },
      {
        name: 'Showroom',
        addressLine1: '7 Tannery Wharf',
        city: 'Ketterby',
        region: 'CO',
        postalCode: '80994',
        usageClass: 2,
        context: publicLot,
        gates: [
          swing('Customer car park gate', 'double', 'push_to_open', 16, '2022-06-15', {
            automaticClosing: true,
          }),
        ],
      },
    ],
  },
  {
    name: 'Pemberly Kennels',
    kind: 'business',
    contactEmail: 'office@pemberly-kennels.test',
    phone: '+1 555 0171',
    sites: [
      {
        name: 'Kennels',
        addressLine1: '61 Dunmore Lane',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80993',
        usageClass: 2,
        context: { ...publicLot, childrenOrPetsPresent: true },
        gates: [slide('Front slide gate', 20, '2019-01-22')],
      },
    ],
  },
  {
    name: 'Aldous & Fenn Storage',
    kind: 'business',
    contactEmail: 'facilities@aldousfenn.test',
    phone: '+1 555 0172',
    sites: [
      {
        name: 'Storage depot',
        addressLine1: '1200 Ironworks Way',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80992',
        usageClass: 3,
        context: quiet,
        gates: [slide('Depot gate', 30, '2016-12-03')],
      },
      {
        name: 'Overflow lot',
        addressLine1: '1240 Ironworks Way',
        city: 'Marrowfield',
        region: 'CO',
        postalCode: '80992',
        usageClass: 3,
        context: quiet,
        gates: [swing('Overflow gate', 'double', 'pull_to_open', 20, '2010-09-09')],
      },
    ],
  },
  {
    name: 'Vantry Hill Community Church',
    kind: 'business',
    contactEmail: 'warden@vantryhill.test',
    phone: '+1 555 0173',
    sites: [
      {
        name: 'Car park',
        addressLine1: '2 Chapel Row',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80993',
        usageClass: 2,
        context: { ...publicLot, childrenOrPetsPresent: true },
        gates: [
          swing('Car park gate', 'double', 'pull_to_open', 18, '2015-04-04', { automaticClosing: true }),
        ],
      },
      {
        name: 'Hall yard',
        addressLine1: '4 Chapel Row',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80993',
        usageClass: 2,
        context: publicLot,
        gates: [slide('Hall yard gate', 16, '2020-08-08')],
      },
      {
        name: 'Rectory',
        addressLine1: '6 Chapel Row',
        city: 'Pellbrook',
        region: 'CO',
        postalCode: '80993',
        usageClass: 1,
        context: family,
        gates: [swing('Rectory gate', 'single', 'pull_to_open', 11, '2011-03-23')],
      },
    ],
  },
];
