import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { describeGear } from '../../../../shared/rigging';
import type { Gear } from '../../../../shared/schemas/rig';
import { isApparatusKind, type BridleLeg, type LoadingMode, type Structure } from '../../../../shared/schemas/vocabulary';
import { paths } from '../../../lib/paths';
import { modeLabels, structureLabels, type StudioFormat } from '../format';
import { GearStatusBadge } from './gear-status-badge';
import { gearStandingAt } from '../../../../shared/clearance/gear-standing';

export interface LinkShape {
  gear: Gear;
  mode: LoadingMode;
  threeWay: boolean;
  basketOverHalf: boolean;
  leg: BridleLeg | null;
  includedAngleDeg: number | null;
}

/** "Major 22 kN · Minor 7 kN · Gate open 7 kN · WLL 5 kN", in the studio's display unit. */
export function ratingsLine(gear: Gear, fmt: StudioFormat): string {
  const parts = [`Major ${fmt.force(gear.majorKn)}`];
  if (gear.minorKn !== null) parts.push(`Minor ${fmt.force(gear.minorKn)}`);
  if (gear.gateOpenKn !== null) parts.push(`Gate open ${fmt.force(gear.gateOpenKn)}`);
  if (gear.wllKn !== null) parts.push(`WLL ${fmt.force(gear.wllKn)}`);
  return parts.join(' · ');
}

/** The line drawn between two cards of the chain. */
export function ChainJoint() {
  return <div className="ml-8 h-5 w-1 rounded bg-pine-600/50" aria-hidden />;
}

export function StructureCard({ structure, ratingKn, fmt }: { structure: Structure; ratingKn: number; fmt: StudioFormat }) {
  return (
    <div className="rounded-xl border-2 border-pine-700 bg-pine-50 px-4 py-3">
      <p className="text-xs font-medium uppercase tracking-wide text-muted">Structure</p>
      <p className="font-semibold">{structureLabels[structure]}</p>
      <p className="text-sm text-muted">Structural rating {fmt.force(ratingKn)} (allowable load from the engineer’s assessment)</p>
    </div>
  );
}

/** One link of a load path: what it is, its ratings, and how it is loaded. `children` holds an editor's controls. */
export function LinkCard({ link, index, fmt, children, problem }: { link: LinkShape; index: number; fmt: StudioFormat; children?: ReactNode; problem?: string }) {
  const { gear } = link;
  const apparatus = isApparatusKind(gear.kind);
  const flags = [
    modeLabels[link.mode],
    link.threeWay ? 'takes a three-way load' : null,
    link.basketOverHalf ? 'basket filled past half' : null,
    link.leg ? `bridle leg ${link.leg}${link.includedAngleDeg !== null ? `, included angle ${link.includedAngleDeg}°` : ''}` : null,
  ].filter(Boolean);
  return (
    <div className={`rounded-xl border bg-white px-4 py-3 ${problem ? 'border-stop-700' : apparatus ? 'border-brass-500' : 'border-line'}`}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <p className="text-xs font-medium uppercase tracking-wide text-muted">{apparatus ? `Link ${index + 1} · mounted apparatus` : `Link ${index + 1} · fixed`}</p>
          <p className="font-semibold">
            <Link to={paths.gearItem(gear.id)} className="underline decoration-pine-600/40 underline-offset-2 hover:decoration-pine-700">{describeGear(gear)}</Link>
          </p>
          {gear.maker || gear.model ? <p className="text-sm text-muted">{[gear.maker, gear.model].filter(Boolean).join(' ')}</p> : null}
        </div>
        {gearStandingAt(gear, new Date()) !== 'in_service' ? <GearStatusBadge gear={gear} /> : null}
      </div>
      <p className="mt-1 text-sm">{ratingsLine(gear, fmt)}{gear.multiDirectional ? ' · rated multi-directional' : ''}</p>
      <p className="text-sm text-muted">Loaded: {flags.join('; ')}</p>
      {problem ? <p role="alert" className="mt-1 text-sm font-medium text-stop-700">{problem}</p> : null}
      {children ? <div className="mt-3 border-t border-line pt-3">{children}</div> : null}
    </div>
  );
}

/** The saved path drawn top to bottom: the structure, the fixed links, then the mounted apparatus. */
export function LoadPathChain({ links, structure, ratingKn, fmt }: { links: LinkShape[]; structure: Structure; ratingKn: number; fmt: StudioFormat }) {
  return (
    <ol aria-label="Load path, from the structure down" className="list-none">
      <li><StructureCard structure={structure} ratingKn={ratingKn} fmt={fmt} /></li>
      {links.map((link, i) => (
        <li key={link.gear.id}>
          <ChainJoint />
          <LinkCard link={link} index={i} fmt={fmt} />
        </li>
      ))}
      {links.length === 0 ? (
        <li>
          <ChainJoint />
          <p className="rounded-xl border border-dashed border-line bg-white px-4 py-3 text-sm text-muted">No links yet. The point stays blocked until its fixed links are entered.</p>
        </li>
      ) : null}
    </ol>
  );
}
