import type { SuggestionState } from '../../api/review';

/** A calibrated probability in words and as a number; the words carry it, never a colour. */
export function probabilityWords(p: number | null): { words: string; number: string } {
  if (p === null) return { words: 'ranked, not calibrated', number: 'no probability yet' };
  const number = `${Math.round(p * 100)} %`;
  if (p >= 0.9) return { words: 'very likely', number };
  if (p >= 0.7) return { words: 'likely', number };
  if (p > 0.4) return { words: 'uncertain', number };
  if (p > 0.15) return { words: 'unlikely', number };
  return { words: 'very unlikely', number };
}

export const decisionWords: Record<SuggestionState, string> = {
  proposed: 'Proposed, not decided',
  accepted: 'Accepted',
  rejected: 'Rejected',
  added: 'Added by an editor',
};

export const methodWords: Record<string, string> = {
  prototype: 'from examples',
  regressed: 'from examples, regressed',
  photo_augmented: 'from examples and confirmed items',
  refined: 'refined from a broader subject',
  carried: 'carried from another medium',
  trained: 'trained on decisions',
};

export function kappaWords(kappa: number | null): string {
  // Landis & Koch (1977) bands, the usual reading of kappa (from memory)
  if (kappa === null) return 'not enough items';
  if (kappa < 0) return 'less than chance';
  if (kappa <= 0.2) return 'slight';
  if (kappa <= 0.4) return 'fair';
  if (kappa <= 0.6) return 'moderate';
  if (kappa <= 0.8) return 'substantial';
  return 'almost perfect';
}
