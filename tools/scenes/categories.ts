/**
 * The categories the scene generator renders: every case the motion engine must tell apart.
 * `animal` says whether a subject is present (the ground truth the screener is judged on).
 */
export const Category = {
  animalCrossing: 'animal-crossing',
  animalLingering: 'animal-lingering',
  animalPartial: 'animal-partial',
  animalSmall: 'animal-small',
  animalNight: 'animal-night',
  fishCrossing: 'fish-crossing',
  fishHovering: 'fish-hovering',
  empty: 'empty',
  wind: 'wind-vegetation',
  exposure: 'exposure-change',
  cloudShadow: 'cloud-shadow',
  irLamp: 'ir-lamp-change',
  rain: 'rain',
  insect: 'insect-on-lens',
  shake: 'camera-shake',
  caustics: 'caustics',
  particles: 'particles',
  kelp: 'kelp-sway',
  surge: 'surge',
} as const;

export type CategoryName = (typeof Category)[keyof typeof Category];

export const ANIMAL_CATEGORIES: readonly CategoryName[] = [
  Category.animalCrossing,
  Category.animalLingering,
  Category.animalPartial,
  Category.animalSmall,
  Category.animalNight,
  Category.fishCrossing,
  Category.fishHovering,
];

export const LAND_FALSE: readonly CategoryName[] = [
  Category.empty,
  Category.wind,
  Category.exposure,
  Category.cloudShadow,
  Category.irLamp,
  Category.rain,
  Category.insect,
  Category.shake,
];

export const WATER_FALSE: readonly CategoryName[] = [Category.caustics, Category.particles, Category.kelp, Category.surge];

export const ALL_CATEGORIES: readonly CategoryName[] = [...ANIMAL_CATEGORIES, ...LAND_FALSE, ...WATER_FALSE];

export function isAnimal(c: CategoryName): boolean {
  return ANIMAL_CATEGORIES.includes(c);
}

export function isUnderwater(c: CategoryName): boolean {
  return c === Category.fishCrossing || c === Category.fishHovering || WATER_FALSE.includes(c);
}
