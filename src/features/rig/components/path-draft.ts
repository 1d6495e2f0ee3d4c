import type { LinkInput } from '../../../../shared/rigging';
import type { PathConfig } from '../../../../shared/clearance';
import type { Gear, LoadPathBody, Point } from '../../../../shared/schemas/rig';
import { isApparatusKind } from '../../../../shared/schemas/vocabulary';
import type { DraftLink } from './link-controls';

let seq = 0;
const nextKey = () => `l${++seq}`;

export function draftOf(point: Point): DraftLink[] {
  return (point.links ?? [])
    .slice()
    .sort((a, b) => a.position - b.position)
    .map((l) => ({
      key: nextKey(),
      gear: l.gear,
      mode: l.mode,
      threeWay: l.threeWay,
      basketOverHalf: l.basketOverHalf,
      leg: l.leg,
      includedAngleDeg: l.includedAngleDeg,
      angleText: l.includedAngleDeg === null ? '' : String(l.includedAngleDeg),
    }));
}

export function newLink(gear: Gear): DraftLink {
  return { key: nextKey(), gear, mode: 'major', threeWay: false, basketOverHalf: false, leg: null, includedAngleDeg: null, angleText: '' };
}

/** The typed angle as a number (NaN when it is not one); null off the bridle or when left empty. */
export function angleOf(link: DraftLink): number | null {
  if (!link.leg) return null;
  const t = link.angleText.trim();
  return t === '' ? null : Number(t);
}

/** A new link goes to the end, above the mounted apparatus if there is one; a second apparatus is refused. */
export function addLink(links: DraftLink[], gear: Gear): DraftLink[] | string {
  const last = links[links.length - 1];
  const hasApparatus = last !== undefined && isApparatusKind(last.gear.kind);
  if (isApparatusKind(gear.kind)) {
    if (hasApparatus) return 'An apparatus is already mounted at the bottom of the path. Swap it instead of adding a second one.';
    return [...links, newLink(gear)];
  }
  return hasApparatus ? [...links.slice(0, -1), newLink(gear), last] : [...links, newLink(gear)];
}

export function moveLink(links: DraftLink[], index: number, dir: -1 | 1): DraftLink[] {
  const to = index + dir;
  if (to < 0 || to >= links.length) return links;
  const next = links.slice();
  [next[index], next[to]] = [next[to], next[index]];
  return next;
}

/** The path as the shared load check reads it. */
export function toLinkInputs(links: DraftLink[]): LinkInput<Gear>[] {
  return links.map((l) => {
    const angle = angleOf(l);
    return { gear: l.gear, mode: l.mode, threeWay: l.threeWay, basketOverHalf: l.basketOverHalf, leg: l.leg, includedAngleDeg: angle === null || Number.isNaN(angle) ? null : angle };
  });
}

export function toBody(links: DraftLink[]): LoadPathBody {
  return {
    links: links.map((l, i) => ({
      gearId: l.gear.id,
      mode: l.mode,
      threeWay: l.threeWay,
      basketOverHalf: l.basketOverHalf,
      ...(l.leg ? { leg: l.leg, includedAngleDeg: angleOf(l) ?? undefined } : {}),
    })),
  };
}

/** The shape the shared voiding rule compares (PRODUCT.md §4.1). */
export function pathConfig(structuralRatingKn: number, links: LinkInput<Gear>[]): PathConfig {
  return {
    structuralRatingKn,
    links: links.map((l, i) => ({
      gearId: l.gear.id,
      mode: l.mode,
      threeWay: l.threeWay,
      basketOverHalf: l.basketOverHalf,
      leg: l.leg,
      includedAngleDeg: l.includedAngleDeg,
      majorKn: l.gear.majorKn,
      minorKn: l.gear.minorKn,
      gateOpenKn: l.gear.gateOpenKn,
      wllKn: l.gear.wllKn,
      multiDirectional: l.gear.multiDirectional,
      // Only the last link can be the mounted apparatus; one higher up is a link like any other.
      isApparatus: i === links.length - 1 && isApparatusKind(l.gear.kind),
    })),
  };
}

/** Whether two paths are the same, link by link (an identical save changes nothing). */
export function samePath(a: PathConfig, b: PathConfig): boolean {
  return JSON.stringify(a.links) === JSON.stringify(b.links);
}
