/**
 * The demo scenario's cast (all invented; .example is a reserved domain): the firms, their working
 * weeks, their crews, people and machines, the spa models and the householders. seeds/demo.ts
 * seeds them and has the scheduling engine plan their work.
 */

/** A firm of the scenario; partner firms have a bookings address their requests go to. */
export type Firm = { name: string; kind: string; region?: string; phone: string; email?: string };
/** The two installers (Tideway, whose office the demo follows, and Moorview) and the partner firms. */
export const FIRMS: Firm[] = [
  { name: 'Tideway Hot Tubs', kind: 'installer', phone: '0113 496 0001' },
  { name: 'Moorview Spas', kind: 'installer', phone: '01423 496 002' },
  { name: 'Fellside Crane Hire', kind: 'crane_hire', phone: '0113 496 0101', email: 'bookings@fellside.example' },
  { name: 'Ridgeway Plant Hire', kind: 'plant_hire', phone: '0113 496 0102', email: 'bookings@ridgeway.example' },
  { name: 'Brightspark Electrical', kind: 'electrical', phone: '0113 496 0103', email: 'bookings@brightspark.example' },
  { name: 'Northgate Electrical', kind: 'electrical', phone: '0113 496 0104', email: 'bookings@northgate.example' },
  { name: 'Millstone Groundworks', kind: 'groundworks', phone: '0113 496 0105', email: 'bookings@millstone.example' },
  { name: 'Carrow Haulage', kind: 'haulage', phone: '0113 496 0106', email: 'bookings@carrow.example' },
];

/** Monday to Friday 08:00–17:00 (minutes past local midnight, by weekday 0 = Sunday). */
export const WEEKDAYS_8_TO_5 = {
  1: [[480, 1020]],
  2: [[480, 1020]],
  3: [[480, 1020]],
  4: [[480, 1020]],
  5: [[480, 1020]],
};
/** The electricians' week: 07:30–16:30, and Saturday mornings. */
export const ELECTRICIAN_HOURS = {
  1: [[450, 990]],
  2: [[450, 990]],
  3: [[450, 990]],
  4: [[450, 990]],
  5: [[450, 990]],
  6: [[480, 720]],
};

/** A crew, person or machine of a firm; crews name their people, a person who signs in names their e-mail. */
export type Res = {
  firm: string;
  name: string;
  category: 'crew' | 'person' | 'machine';
  kind: string;
  ownership?: 'owned' | 'hired';
  calendar?: string;
  email?: string;
  members?: string[];
  phone?: string;
};
/**
 * Tideway's three crews and its owned and hired plant; the partners' cranes, electricians, gangs and lorry.
 * The crews' day phones are in the 07700 900xxx range the UK regulator keeps for fiction: never anyone's.
 */
export const RESOURCES: Res[] = [
  {
    firm: 'Tideway Hot Tubs',
    name: 'Connor Reid',
    category: 'person',
    kind: 'installer',
    email: 'connor.reid@tideway.example',
  },
  { firm: 'Tideway Hot Tubs', name: 'Aisha Bello', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Jamie Whitlow', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Rhys Pennock', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Lena Marsh', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Dev Chauhan', category: 'person', kind: 'installer' },
  {
    firm: 'Tideway Hot Tubs',
    name: 'Crew Heron',
    category: 'crew',
    kind: 'install_crew',
    phone: '07700 900501',
    members: ['Connor Reid', 'Aisha Bello'],
  },
  {
    firm: 'Tideway Hot Tubs',
    name: 'Crew Kestrel',
    category: 'crew',
    kind: 'install_crew',
    phone: '07700 900502',
    members: ['Jamie Whitlow', 'Rhys Pennock'],
  },
  {
    firm: 'Tideway Hot Tubs',
    name: 'Crew Otter',
    category: 'crew',
    kind: 'install_crew',
    phone: '07700 900503',
    members: ['Lena Marsh', 'Dev Chauhan'],
  },
  { firm: 'Tideway Hot Tubs', name: '1.5 t excavator', category: 'machine', kind: 'excavator' },
  {
    firm: 'Tideway Hot Tubs',
    name: '3 t excavator (hired)',
    category: 'machine',
    kind: 'excavator',
    ownership: 'hired',
  },
  { firm: 'Tideway Hot Tubs', name: 'Tracked dumper', category: 'machine', kind: 'dumper' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 1', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 2', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 3', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 4', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Roller set', category: 'machine', kind: 'rollers' },
  { firm: 'Fellside Crane Hire', name: '25 t city crane', category: 'machine', kind: 'crane' },
  { firm: 'Fellside Crane Hire', name: '60 t mobile crane', category: 'machine', kind: 'crane' },
  // The appointed person who visits the site and writes the lift plan before each lift.
  { firm: 'Fellside Crane Hire', name: 'Fellside lift planner', category: 'person', kind: 'lift_planner' },
  {
    firm: 'Brightspark Electrical',
    name: 'Priya Nair',
    category: 'person',
    kind: 'electrician',
    calendar: 'Electricians',
    email: 'priya.nair@brightspark.example',
  },
  {
    firm: 'Brightspark Electrical',
    name: 'Tom Ashworth',
    category: 'person',
    kind: 'electrician',
    calendar: 'Electricians',
  },
  {
    firm: 'Northgate Electrical',
    name: 'Gareth Pryce',
    category: 'person',
    kind: 'electrician',
    calendar: 'Electricians',
  },
  { firm: 'Millstone Groundworks', name: 'Millstone gang', category: 'crew', kind: 'groundworks_crew' },
  { firm: 'Millstone Groundworks', name: 'Millstone second gang', category: 'crew', kind: 'groundworks_crew' },
  { firm: 'Carrow Haulage', name: '18 t lorry with loader crane', category: 'machine', kind: 'lorry' },
  // Takes the dig's spoil away (the skips or grab-lorry loads the job's quantities count).
  { firm: 'Carrow Haulage', name: 'Grab lorry', category: 'machine', kind: 'spoil_removal' },
  { firm: 'Moorview Spas', name: 'Moorview crew', category: 'crew', kind: 'install_crew' },
];

/** The spa models Tideway installs (invented makers and models). */
export const UNITS = [
  {
    model: 'Brook 4',
    maker: 'Harbourline Works',
    lengthMm: 2000,
    widthMm: 2000,
    heightMm: 850,
    dryWeightKg: 300,
    filledWeightKg: 1650,
    waterLitres: 1250,
    supplies: [{ amps: 16 }],
    makerLeadDays: 15,
  },
  {
    model: 'Aurora 6',
    maker: 'Harbourline Works',
    lengthMm: 2200,
    widthMm: 2200,
    heightMm: 900,
    dryWeightKg: 380,
    filledWeightKg: 2300,
    waterLitres: 1500,
    supplies: [{ amps: 32 }],
    makerLeadDays: 20,
  },
  {
    model: 'Solway 7',
    maker: 'Ostra Baths',
    lengthMm: 2300,
    widthMm: 2300,
    heightMm: 950,
    dryWeightKg: 450,
    filledWeightKg: 2900,
    waterLitres: 1900,
    supplies: [{ amps: 32 }],
    makerLeadDays: 25,
  },
  {
    model: 'Tarn Swim 45',
    maker: 'Ostra Baths',
    lengthMm: 4500,
    widthMm: 2300,
    heightMm: 1300,
    dryWeightKg: 1600,
    filledWeightKg: 10500,
    waterLitres: 8900,
    supplies: [{ amps: 32 }, { amps: 32 }],
    makerLeadDays: 35,
  },
];

/** The ground the surveys find, in turn. */
export const GROUND_TYPES = ['clay', 'loam', 'sand_gravel'] as const;

/** The householders and their sites, one per job, TW-2401 onwards: name, address, town, postcode. */
export const CUSTOMERS: [string, string, string, string][] = [
  ['Hannah Greaves', '14 Larch Rise', 'Otley', 'LS21 3QP'],
  ['Marcus Doyle', '2 The Paddocks', 'Ilkley', 'LS29 8RT'],
  ['Priti Shah', '77 Beechwood Road', 'Harrogate', 'HG2 0LX'],
  ['Owen Pritchard', 'Rose Cottage, Moor Lane', 'Pool-in-Wharfedale', 'LS21 1EH'],
  ['Grace Achebe', '9 Kingfisher Way', 'Wetherby', 'LS22 6XN'],
  ['Tomasz Nowak', '31 Station Road', 'Horsforth', 'LS18 5PA'],
  ['Ellie Fairburn', 'The Old Barn, Hall Lane', 'Bramhope', 'LS16 9AS'],
  ['Declan Murphy', '5 Willow Close', 'Knaresborough', 'HG5 0SD'],
  ['Sofia Rinaldi', '112 Park Avenue', 'Roundhay', 'LS8 2JH'],
  ['Jack Thornton', '18 Millbeck Green', 'Collingham', 'LS22 5AG'],
  ['Ruth Okonjo', '6 Heather View', 'Burley-in-Wharfedale', 'LS29 7DW'],
  ['Ian Castleford', 'Hillside Farm', 'Arthington', 'LS21 1PJ'],
  ['Mei Chen', '40 Orchard Drive', 'Adel', 'LS16 8BQ'],
  ['Liam Hebden', '3 Quarry Court', 'Menston', 'LS29 6NR'],
  ['Nadia Haddad', '21 Sycamore Lane', 'Boston Spa', 'LS23 6AY'],
  ['Colin Ashby', '8 Riverside Mews', 'Pannal', 'HG3 1JW'],
  ['Freya Lund', '56 Church Street', 'Bingley', 'BD16 2LE'],
  ['Kwame Mensah', '12 Acorn Grove', 'Shipley', 'BD18 4QT'],
  ['Holly Barraclough', 'Wren House, Back Lane', 'Spofforth', 'HG3 1AQ'],
  ['Arjun Kapoor', '27 Meadow Bank', 'Guiseley', 'LS20 9HD'],
  ['Beth Garside', '4 Foxglove Walk', 'Baildon', 'BD17 6TS'],
  ['Rory Mackintosh', '63 Grange Road', 'Alwoodley', 'LS17 7HF'],
  ['Zara Lindley', '10 Ash Tree Court', 'Yeadon', 'LS19 7SL'],
  ['Peter Hollings', '1 Lock Keepers Row', 'Rodley', 'LS13 1LQ'],
];
