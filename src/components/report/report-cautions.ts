/**
 * The short caution box of a Flight report (PRODUCT.md, "Workload cautions"): landing-zone safety for every
 * flight, the overuse caution for youth athletes. The wording defers to governing bodies, local rules and licensed
 * practice and never reads as medical advice.
 */

export interface ReportCaution {
  key: 'landing-zone' | 'youth-workload';
  title: string;
  text: string;
}

/** Below this age (in the year of the session) an athlete counts as youth for the caution. */
export const YOUTH_AGE_LIMIT = 18;
/** Implements at least this heavy (shot, hammer) get the throwing-sector sentence. */
const HEAVY_IMPLEMENT_KG = 1;

export function isYouth(birthYear: number | null | undefined, sessionDate: string | null | undefined, today: Date = new Date()): boolean {
  if (!birthYear) return false;
  const year = sessionDate && /^\d{4}/.test(sessionDate) ? Number(sessionDate.slice(0, 4)) : today.getFullYear();
  return year - birthYear < YOUTH_AGE_LIMIT;
}

export function reportCautions(input: { birthYear: number | null; sessionDate: string | null; ballMassKg: number | null }, today?: Date): ReportCaution[] {
  const heavy = input.ballMassKg !== null && input.ballMassKg >= HEAVY_IMPLEMENT_KG;
  const out: ReportCaution[] = [
    {
      key: 'landing-zone',
      title: 'Landing zone',
      text: heavy
        ? 'Nobody stands in the throwing sector or the landing zone while implements are thrown; follow the governing body\'s competition rules and the venue\'s own rules for the sector.'
        : 'Keep the landing zone clear while throwing or kicking, and make sure everyone nearby knows a ball is coming.',
    },
  ];
  if (isYouth(input.birthYear, input.sessionDate, today)) {
    out.push({
      key: 'youth-workload',
      title: 'Young athlete',
      text: 'Repeated throwing and kicking can cause overuse injuries in young athletes. Keep within the workload guidance of the athlete\'s governing body and local rules, and ask a licensed medical professional about any pain. These measurements are not medical advice.',
    });
  }
  return out;
}
