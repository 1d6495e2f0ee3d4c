import type { RatedGear } from '../rigging/types';
import type { BridleLeg, LoadingMode } from '../schemas/vocabulary';
import { isApparatusKind } from '../schemas/vocabulary';
import { splitPath } from './status';
import type { PointSnapshot } from './types';

/** One link of a saved load path together with the ratings of its gear at the time of saving. */
export interface PathLinkConfig {
  gearId: number;
  mode: LoadingMode;
  threeWay: boolean;
  basketOverHalf: boolean;
  /** Optional because the wire format leaves it out for links outside a bridle. */
  leg?: BridleLeg | null;
  includedAngleDeg?: number | null;
  majorKn: number;
  minorKn: number | null;
  gateOpenKn: number | null;
  wllKn: number | null;
  multiDirectional: boolean;
  isApparatus: boolean;
}

export interface PathConfig {
  structuralRatingKn: number;
  links: PathLinkConfig[];
}

type Ratings = Pick<RatedGear, 'majorKn' | 'minorKn' | 'gateOpenKn' | 'wllKn' | 'multiDirectional'>;

function sameRatings(a: Ratings, b: Ratings): boolean {
  return (
    a.majorKn === b.majorKn &&
    (a.minorKn ?? null) === (b.minorKn ?? null) &&
    (a.gateOpenKn ?? null) === (b.gateOpenKn ?? null) &&
    (a.wllKn ?? null) === (b.wllKn ?? null) &&
    a.multiDirectional === b.multiDirectional
  );
}

function sameFixedLink(a: PathLinkConfig, b: PathLinkConfig): boolean {
  return (
    a.gearId === b.gearId &&
    a.mode === b.mode &&
    a.threeWay === b.threeWay &&
    a.basketOverHalf === b.basketOverHalf &&
    (a.leg ?? null) === (b.leg ?? null) &&
    (a.includedAngleDeg ?? null) === (b.includedAngleDeg ?? null) &&
    sameRatings(a, b)
  );
}

/**
 * PRODUCT.md §4.1: whether replacing `before` by `after` voids the point's clearance. Only the fixed
 * rigging and the structural rating count; the mounted apparatus carries its own inspection, so
 * mounting, swapping or removing it voids nothing.
 */
export function voidsClearance(before: PathConfig, after: PathConfig): boolean {
  if (before.structuralRatingKn !== after.structuralRatingKn) return true;
  const fixedBefore = before.links.filter((l) => !l.isApparatus);
  const fixedAfter = after.links.filter((l) => !l.isApparatus);
  if (fixedBefore.length !== fixedAfter.length) return true;
  return fixedBefore.some((link, i) => !sameFixedLink(link, fixedAfter[i]));
}

/**
 * Whether editing a gear item's ratings voids the clearance of the point whose fixed rigging holds it.
 * An apparatus's ratings void nothing: it is never a fixed link.
 */
export function gearRatingChangeVoids<G extends Ratings & Pick<RatedGear, 'kind'>>(beforeGear: G, afterGear: G): boolean {
  if (isApparatusKind(beforeGear.kind) && isApparatusKind(afterGear.kind)) return false;
  return beforeGear.kind !== afterGear.kind || !sameRatings(beforeGear, afterGear);
}

/** The path configuration of a snapshot, for comparing a saved path with a new one. */
export function pathConfigOf(snapshot: Pick<PointSnapshot, 'structuralRatingKn' | 'links'>): PathConfig {
  const { apparatus } = splitPath(snapshot.links);
  return {
    structuralRatingKn: snapshot.structuralRatingKn,
    links: snapshot.links.map((link) => ({
      gearId: link.gear.id,
      mode: link.mode,
      threeWay: link.threeWay,
      basketOverHalf: link.basketOverHalf,
      leg: link.leg,
      includedAngleDeg: link.includedAngleDeg,
      majorKn: link.gear.majorKn,
      minorKn: link.gear.minorKn,
      gateOpenKn: link.gear.gateOpenKn,
      wllKn: link.gear.wllKn,
      multiDirectional: link.gear.multiDirectional,
      isApparatus: link === apparatus,
    })),
  };
}
