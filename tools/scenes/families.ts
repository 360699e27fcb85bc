/**
 * Scene families: whole invented deployments (one camera at one place, a day's or a week's
 * triggers), drawn from regions of the parameters a camera and a place can take. The burst model
 * is fitted on scenes of the generator's usual ranges (`home`); the other families lie outside
 * those ranges on purpose (other sensors, strips, compression, burst timing, vegetation, visitors
 * that keep to one trail), so that a number measured on them says how the screener does on
 * footage it was not fitted on. Every value here is a choice of this invented scenario, stated
 * so that a reader can see which ranges the fitting never saw; none is measured from a camera.
 *
 * A deployment is written to disk as JPEGs with EXIF capture times (write-deployment.ts) and
 * screened by the product's own scan: grouping, neighbours, strip detection and every pass run
 * exactly as for a user's card.
 */
import { Category, LAND_FALSE, type CategoryName } from './categories.js';
import type { StripStyle } from './data-strip.js';
import { makeRng, type Rng } from './random.js';
import type { SceneStyle } from './render.js';

export interface TriggerDraw {
  seed: number;
  category: CategoryName;
  light: 'day' | 'ir';
  frames: number;
  intervalS: number;
  /** Minutes since the deployment's previous trigger. */
  gapMin: number;
  /** For an animal: the place's own false trigger at full strength around it (wind, a cloud
   *  shadow, rain, an insect on the lens), when the weather was doing it as the animal passed. */
  distractor?: CategoryName;
}

export interface DeploymentDraw {
  id: string;
  family: FamilyName;
  width: number;
  height: number;
  strip: StripStyle | null;
  jpegQuality: number;
  style: SceneStyle;
  /** Seed of the place: every trigger of the deployment shows the same world. */
  world: number;
  triggers: TriggerDraw[];
}

export const FAMILIES = ['home', 'other-cameras', 'trail', 'busy-trail'] as const;
export type FamilyName = (typeof FAMILIES)[number];

export interface FamilyFacts {
  name: FamilyName;
  /** Outside the ranges the burst model was fitted on. */
  heldOut: boolean;
  /** Most triggers are false (the premise of per-deployment statistics). */
  mostlyFalse: boolean;
  about: string;
}

export const FAMILY_FACTS: Record<FamilyName, FamilyFacts> = {
  home: { name: 'home', heldOut: false, mostlyFalse: true, about: 'the fitted ranges: 320-480 px, 16:9 or 4:3, a thin bottom strip or none, 3-5 frames at 0.3-1.2 s' },
  'other-cameras': {
    name: 'other-cameras',
    heldOut: true,
    mostlyFalse: true,
    about: '800-1024 px at 4:3 or 3:2, strips at the top or both edges (2-9%, either polarity, icons, text spread over the width), JPEG 55-75, 1.4-2.2x noise, dense vegetation, 2 frames or 5-8, 0.15-0.25 s or 1.5-2.5 s apart',
  },
  trail: { name: 'trail', heldOut: true, mostlyFalse: true, about: 'other cameras on a game trail: visitors pass or stop at the same place, so neighbouring triggers hold them there too' },
  'busy-trail': { name: 'busy-trail', heldOut: true, mostlyFalse: false, about: 'a trail where 60-80% of triggers hold an animal: the mostly-false premise fails' },
};

const LAND_ANIMALS: readonly CategoryName[] = [Category.animalCrossing, Category.animalLingering, Category.animalPartial, Category.animalSmall];
/** False triggers a place can be prone to (the lamp change happens only at night). */
const NUISANCES = LAND_FALSE.filter((c) => c !== Category.irLamp);
const ANIMAL_SET: ReadonlySet<CategoryName> = new Set(LAND_ANIMALS);

function drawTriggers(rng: Rng, seedBase: number, count: number, animalShare: number, burst: () => { frames: number; intervalS: number }): TriggerDraw[] {
  // A place is prone to two or three kinds of false trigger, and every kind can still happen.
  const prone = [rng.pick(NUISANCES), rng.pick(NUISANCES), rng.pick(NUISANCES)];
  const night = rng.range(0.15, 0.45);
  const out: TriggerDraw[] = [];
  for (let i = 0; i < count; i++) {
    const light: 'day' | 'ir' = rng.chance(night) ? 'ir' : 'day';
    let category: CategoryName;
    if (rng.chance(animalShare)) category = light === 'ir' ? Category.animalNight : rng.pick(LAND_ANIMALS);
    else if (light === 'ir' && rng.chance(0.25)) category = Category.irLamp;
    else {
      category = rng.chance(0.75) ? rng.pick(prone) : rng.pick(NUISANCES);
      if (light === 'ir' && category === Category.cloudShadow) category = Category.empty; // no sun at night
    }
    const b = burst();
    // Animals do not wait for calm weather: one in three passes during one of the place's own
    // false triggers (our choice of share). Drawn from a generator of its own, so that adding it
    // left every other draw of every deployment as it was.
    const weather = makeRng(seedBase + i + 7_919);
    const withWeather = category !== Category.animalNight && ANIMAL_SET.has(category) && weather.chance(1 / 3);
    const distractor = withWeather ? weather.pick(prone.filter((c) => c !== Category.empty)) : undefined;
    out.push({ seed: seedBase + i, category, light, ...b, gapMin: Math.round(rng.range(3, 90)), ...(distractor ? { distractor } : {}) });
  }
  return out;
}

/** One deployment of a family, entirely from its seed. */
export function drawDeployment(family: FamilyName, seed: number, triggers = 24): DeploymentDraw {
  const rng = makeRng(seed * 6_151 + FAMILIES.indexOf(family) * 97 + 3);
  const id = `${family}-${seed}`;
  const seedBase = seed * 1_000;
  if (family === 'home') {
    const width = rng.pick([320, 384, 480]);
    const height = Math.round((width * rng.pick([9, 12])) / 16);
    const strip: StripStyle | null = rng.chance(0.7) ? { edge: 'bottom', share: rng.range(0.04, 0.06), bar: rng.int(8, 30), ink: rng.int(220, 250) } : null;
    const burst = () => (rng.chance(0.2) ? { frames: 1, intervalS: 1 } : { frames: rng.pick([3, 3, 5]), intervalS: rng.range(0.3, 1.2) });
    return { id, family, width, height, strip, jpegQuality: rng.int(78, 92), style: {}, world: seed, triggers: drawTriggers(rng, seedBase, triggers, rng.range(0.1, 0.3), burst) };
  }
  // Other cameras: a larger sensor, another strip, harder compression, more noise, denser cover.
  const width = rng.pick([800, 960, 1024]);
  const height = Math.round((width * rng.pick([3 / 4, 2 / 3])) / 2) * 2; // 4:3 or 3:2
  const inverted = rng.chance(0.5);
  const strip: StripStyle | null = rng.chance(0.9)
    ? {
        edge: rng.chance(0.5) ? 'top' : 'both', share: rng.range(0.02, 0.09), bar: inverted ? rng.int(200, 235) : rng.int(0, 20), ink: inverted ? rng.int(0, 40) : rng.int(200, 255),
        icon: rng.chance(0.5), layout: rng.chance(0.7) ? 'spread' : 'left',
      }
    : null;
  const burst = () => {
    const r = rng.next();
    if (r < 0.2) return { frames: 1, intervalS: 1 };
    if (r < 0.6) return { frames: 2, intervalS: rng.range(0.15, 0.25) };
    return { frames: rng.int(5, 8), intervalS: rng.range(1.5, 2.5) };
  };
  const style: SceneStyle = { vegetation: [0.6, 0.95], noiseScale: rng.range(1.4, 2.2) };
  let share = rng.range(0.1, 0.3);
  if (family === 'trail' || family === 'busy-trail') {
    style.spot = { x: rng.range(0.3, 0.7), y: rng.range(0.5, 0.8) };
    if (family === 'busy-trail') share = rng.range(0.6, 0.8);
  }
  return { id, family, width, height, strip, jpegQuality: rng.int(55, 75), style, world: seed, triggers: drawTriggers(rng, seedBase, triggers, share, burst) };
}
