import type { SubjectListEntry } from '../../api/subjects';

export interface TreeNode {
  subject: SubjectListEntry;
  depth: number;
  children: TreeNode[];
}

/** The collection's subjects as a forest, each level in label order. A subject whose broader one is missing sits at the top. */
export function buildTree(subjects: readonly SubjectListEntry[]): TreeNode[] {
  const ids = new Set(subjects.map((s) => s.id));
  const byParent = new Map<number | null, SubjectListEntry[]>();
  for (const s of subjects) {
    const parent = s.broaderId !== null && ids.has(s.broaderId) ? s.broaderId : null;
    byParent.set(parent, [...(byParent.get(parent) ?? []), s]);
  }
  const seen = new Set<number>();
  const level = (parent: number | null, depth: number): TreeNode[] =>
    (byParent.get(parent) ?? [])
      .filter((s) => !seen.has(s.id))
      .sort((a, b) => a.prefLabel.localeCompare(b.prefLabel))
      .map((s) => {
        seen.add(s.id);
        return { subject: s, depth, children: level(s.id, depth + 1) };
      });
  return level(null, 0);
}

/** The ids of a subject and every subject below it. */
export function subtreeIds(subjects: readonly SubjectListEntry[], rootId: number): Set<number> {
  const out = new Set<number>([rootId]);
  let grew = true;
  while (grew) {
    grew = false;
    for (const s of subjects) {
      if (s.broaderId !== null && out.has(s.broaderId) && !out.has(s.id)) {
        out.add(s.id);
        grew = true;
      }
    }
  }
  return out;
}

/** Subjects a subject may go under, in tree order with their depth: not itself, not one of its narrower subjects. */
export function broaderChoices(subjects: readonly SubjectListEntry[], subjectId: number | null): Array<{ id: number; prefLabel: string; depth: number }> {
  const blocked = subjectId === null ? new Set<number>() : subtreeIds(subjects, subjectId);
  const out: Array<{ id: number; prefLabel: string; depth: number }> = [];
  const walk = (nodes: TreeNode[]) => {
    for (const n of nodes) {
      if (blocked.has(n.subject.id)) continue;
      out.push({ id: n.subject.id, prefLabel: n.subject.prefLabel, depth: n.depth });
      walk(n.children);
    }
  };
  walk(buildTree(subjects));
  return out;
}
