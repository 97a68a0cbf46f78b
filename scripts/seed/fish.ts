// Invented fish. Microchip numbers use code 999, which ISO 11784 reserves for test transponders, so no
// demo number can be a real fish's; they pass the app's ISO 11784 structure check. Breeders, shows and
// dealers have plainly invented names.
type DemoFish = {
  name: string
  species: 'koi' | 'goldfish'
  variety: string
  sex: 'unknown' | 'male' | 'female'
  hatchYear: number
  estimated?: boolean
  microchip?: string
  features: string
  acquiredFrom: string
  acquiredOn: string
}

export const gardenPondFish: DemoFish[] = [
  { name: 'Hoshi', species: 'koi', variety: 'Kohaku', sex: 'female', hatchYear: 2004, microchip: '999000024681357', features: 'Three-step red pattern; small white notch on the left pectoral fin.', acquiredFrom: 'Exampleton Koi Show', acquiredOn: '2007-05-19' },
  { name: 'Bento', species: 'koi', variety: 'Showa', sex: 'male', hatchYear: 2012, microchip: '999000024681358', features: 'Black lightning mark across the head.', acquiredFrom: 'Pondmore Aquatics (dealer)', acquiredOn: '2013-06-02' },
  { name: 'Clementine', species: 'koi', variety: 'Chagoi', sex: 'female', hatchYear: 2009, microchip: '999000011223344', features: 'Large, calm, eats from the hand; slight scale loss near the tail.', acquiredFrom: 'Friend\'s pond', acquiredOn: '2011-08-14' },
  { name: 'Juniper', species: 'koi', variety: 'Sanke', sex: 'female', hatchYear: 2016, microchip: '999000011223345', features: 'Black spot on the right gill plate.', acquiredFrom: 'Sample Hollow koi auction', acquiredOn: '2017-04-30' },
  { name: 'Pilot', species: 'koi', variety: 'Ogon', sex: 'male', hatchYear: 2003, estimated: true, microchip: '999000024681360', features: 'Metallic gold; left eye removed; follows Clementine.', acquiredFrom: 'Rescued from a drained pond', acquiredOn: '2010-09-01' },
  { name: 'Marble', species: 'koi', variety: 'Kumonryu', sex: 'unknown', hatchYear: 2019, microchip: '999000024681361', features: 'Pattern changes with the seasons; white nose.', acquiredFrom: 'Pondmore Aquatics (dealer)', acquiredOn: '2020-05-10' },
  { name: 'Saffron', species: 'koi', variety: 'Yamabuki Ogon', sex: 'female', hatchYear: 2014, microchip: '999000024681362', features: 'Pale yellow, long fins.', acquiredFrom: 'Exampleton Koi Show', acquiredOn: '2015-06-20' },
  { name: 'Tancho', species: 'koi', variety: 'Tancho Kohaku', sex: 'male', hatchYear: 2018, microchip: '999000024681363', features: 'Single round red spot on the head.', acquiredFrom: 'Sample Hollow koi auction', acquiredOn: '2019-07-07' },
  { name: 'Nori', species: 'koi', variety: 'Karasu', sex: 'male', hatchYear: 2001, estimated: true, features: 'All black with white fin tips; the oldest fish.', acquiredFrom: 'Came with the house', acquiredOn: '2006-03-15' },
  { name: 'Pebble', species: 'koi', variety: 'Shusui', sex: 'female', hatchYear: 2024, features: 'Blue back with a row of red scales along each side.', acquiredFrom: 'Hatched in the pond', acquiredOn: '2024-06-30' },
]

export const courtyardPondFish: DemoFish[] = [
  { name: 'Button', species: 'goldfish', variety: 'Ryukin', sex: 'female', hatchYear: 2020, features: 'Tall back, red and white.', acquiredFrom: 'Nowhere Lane Garden Centre', acquiredOn: '2021-04-11' },
  { name: 'Mochi', species: 'goldfish', variety: 'Oranda', sex: 'male', hatchYear: 2017, microchip: '999120031234567', features: 'Large wen, orange.', acquiredFrom: 'Exampleton Goldfish Club sale', acquiredOn: '2018-05-05' },
  { name: 'Comet', species: 'goldfish', variety: 'Comet', sex: 'unknown', hatchYear: 2022, features: 'Long single tail, fast.', acquiredFrom: 'Nowhere Lane Garden Centre', acquiredOn: '2022-07-02' },
  { name: 'Sunny', species: 'goldfish', variety: 'Shubunkin', sex: 'female', hatchYear: 2015, features: 'Calico with a blue tail.', acquiredFrom: 'Friend\'s pond', acquiredOn: '2016-06-18' },
  { name: 'Yuzu', species: 'koi', variety: 'Ki Utsuri', sex: 'female', hatchYear: 2021, microchip: '999120031234568', features: 'Yellow and black; grown on in the Courtyard pond until 2024.', acquiredFrom: 'Pondmore Aquatics (dealer)', acquiredOn: '2022-05-21' },
  { name: 'Kenzo', species: 'koi', variety: 'Asagi', sex: 'male', hatchYear: 2023, features: 'Blue net pattern, orange belly; grown on in the Courtyard pond until 2026.', acquiredFrom: 'Sample Hollow koi auction', acquiredOn: '2024-04-27' },
]

export const whitlockPondFish: DemoFish[] = [
  { name: 'Duchess', species: 'koi', variety: 'Goshiki', sex: 'female', hatchYear: 2011, microchip: '999200009876543', features: 'Dark net pattern over red.', acquiredFrom: 'Fictional Fields Koi Farm', acquiredOn: '2012-05-12' },
  { name: 'Rusty', species: 'koi', variety: 'Benigoi', sex: 'male', hatchYear: 2015, microchip: '999200009876544', features: 'Deep red all over.', acquiredFrom: 'Fictional Fields Koi Farm', acquiredOn: '2016-05-14' },
  { name: 'Ghost', species: 'koi', variety: 'Platinum Ogon', sex: 'unknown', hatchYear: 2018, features: 'Silver-white, metallic.', acquiredFrom: 'Pondmore Aquatics (dealer)', acquiredOn: '2019-06-01' },
]
