import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { buildDemoScenario, renderItemImage, renderScene, type DemoCollection, type Role } from '../../scripts/demo/index.ts';

const scenario = buildDemoScenario();
const allItems = scenario.collections.flatMap((c) => c.items);

function formsOf(collection: DemoCollection): Set<string> {
  return new Set(collection.subjects.filter((s) => s.kind === 'form').map((s) => s.key));
}

describe('demo scenario', () => {
  it('is deterministic', () => {
    expect(buildDemoScenario()).toEqual(scenario);
  });

  it('has about 320 items in two or three collections', () => {
    expect(scenario.collections.length).toBeGreaterThanOrEqual(2);
    expect(scenario.collections.length).toBeLessThanOrEqual(3);
    expect(allItems.length).toBeGreaterThanOrEqual(300);
    expect(allItems.length).toBeLessThanOrEqual(340);
  });

  it('uses unique identifiers and file names', () => {
    const ids = allItems.map((i) => i.identifier);
    const files = allItems.map((i) => i.fileName);
    expect(new Set(ids).size).toBe(ids.length);
    expect(new Set(files).size).toBe(files.length);
    expect(new Set(scenario.collections.map((c) => c.slug)).size).toBe(scenario.collections.length);
  });

  it('gives every collection a vocabulary of 8–14 subjects and 2–4 forms', () => {
    for (const c of scenario.collections) {
      const subjects = c.subjects.filter((s) => s.kind === 'subject');
      const forms = c.subjects.filter((s) => s.kind === 'form');
      expect(subjects.length, c.slug).toBeGreaterThanOrEqual(8);
      expect(subjects.length, c.slug).toBeLessThanOrEqual(14);
      expect(forms.length, c.slug).toBeGreaterThanOrEqual(2);
      expect(forms.length, c.slug).toBeLessThanOrEqual(4);
      expect(new Set(c.subjects.map((s) => s.key)).size).toBe(c.subjects.length);
      expect(new Set(c.subjects.map((s) => s.notation)).size).toBe(c.subjects.length);
      for (const s of c.subjects) {
        expect(s.prefLabel.length).toBeGreaterThan(0);
        expect(s.scopeNote.length).toBeGreaterThan(0);
        expect(s.altTextPhrase.length).toBeGreaterThan(0);
        expect(s.altLabels.length).toBeGreaterThan(0);
      }
      expect(c.subjects.some((s) => s.broaderKey !== undefined)).toBe(true);
    }
  });

  it('refers only to subjects of the same collection', () => {
    for (const c of scenario.collections) {
      const keys = new Set(c.subjects.map((s) => s.key));
      for (const s of c.subjects) if (s.broaderKey !== undefined) expect(keys.has(s.broaderKey), `${c.slug}/${s.key} broader`).toBe(true);
      for (const item of c.items) for (const k of item.truth) expect(keys.has(k), `${item.identifier} truth ${k}`).toBe(true);
    }
  });

  it('has no cycles in the broader graph', () => {
    for (const c of scenario.collections) {
      const broader = new Map(c.subjects.map((s) => [s.key, s.broaderKey]));
      for (const s of c.subjects) {
        const seen = new Set<string>();
        let at: string | undefined = s.key;
        while (at !== undefined) {
          expect(seen.has(at), `cycle through ${c.slug}/${at}`).toBe(false);
          seen.add(at);
          at = broader.get(at);
        }
      }
    }
  });

  it('gives every item exactly one form, and never a retired subject', () => {
    for (const c of scenario.collections) {
      const forms = formsOf(c);
      const retired = new Set(c.subjects.filter((s) => s.status === 'retired').map((s) => s.key));
      for (const item of c.items) {
        expect(item.truth.filter((k) => forms.has(k)), item.identifier).toHaveLength(1);
        expect(item.truth.some((k) => retired.has(k)), item.identifier).toBe(false);
        expect(new Set(item.truth).size).toBe(item.truth.length);
      }
    }
  });

  it('has people in every role with unique .example e-mail addresses', () => {
    const roles: Role[] = ['admin', 'archivist', 'editor', 'manager'];
    for (const role of roles) expect(scenario.people.filter((p) => p.role === role).length, role).toBeGreaterThanOrEqual(1);
    const emails = scenario.people.map((p) => p.email);
    expect(new Set(emails).size).toBe(emails.length);
    for (const e of emails) expect(e).toMatch(/^[a-z0-9.]+@[a-z0-9.-]+\.example$/);
    expect(scenario.institution.domain.endsWith('.example')).toBe(true);
  });

  it('has reviewed alt texts that follow common practice', () => {
    const reviewed = allItems.filter((i) => i.reviewed);
    expect(reviewed.length / allItems.length).toBeGreaterThan(0.09);
    expect(reviewed.length / allItems.length).toBeLessThan(0.16);
    expect(reviewed.some((i) => i.reviewed?.decorative)).toBe(true);
    const editors = new Set(scenario.people.filter((p) => p.role === 'editor').map((p) => p.email));
    for (const item of reviewed) {
      const r = item.reviewed!;
      // empty alt text if and only if the item is decorative
      expect(r.altText === '', item.identifier).toBe(r.decorative);
      expect(r.altText, item.identifier).not.toMatch(/^\s*(image|picture|photo) of/i);
      // soft limit from common practice (IPTC Photo Metadata user guide)
      expect(r.altText.length, item.identifier).toBeLessThanOrEqual(125);
      // text visible in the image is named in the alt text
      if (!r.decorative) for (const t of item.scene.visibleText) expect(r.altText.toLowerCase(), item.identifier).toContain(t.toLowerCase());
      expect(editors.has(r.reviewerEmail)).toBe(true);
      expect(Number.isNaN(Date.parse(r.approvedAt))).toBe(false);
    }
  });

  it('flags a few historical captions for editorial review', () => {
    const flagged = allItems.filter((i) => i.captionFlag);
    expect(flagged.length).toBeGreaterThanOrEqual(2);
    expect(flagged.length).toBeLessThanOrEqual(4);
    for (const item of flagged) expect(item.reviewed).toBeUndefined();
  });

  it('records visible text for some items', () => {
    const withText = allItems.filter((i) => i.scene.visibleText.length > 0);
    expect(withText.length).toBeGreaterThan(20);
    for (const item of withText) {
      const svg = renderScene(item.scene);
      const escaped = (t: string) => t.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
      // long poster titles are set on two lines, so compare word by word
      for (const t of item.scene.visibleText) for (const word of t.split(' ')) expect(svg, item.identifier).toContain(escaped(word));
    }
  });
});

describe('demo rendering', () => {
  for (const collection of scenario.collections) {
    it(`renders an item of medium "${collection.medium}" to a valid image quickly`, async () => {
      const item = collection.items[1]!;
      const started = performance.now();
      const image = await renderItemImage(item, collection.medium);
      const elapsed = performance.now() - started;
      const meta = await sharp(image.data).metadata();
      expect(meta.format).toBe(image.mime === 'image/jpeg' ? 'jpeg' : 'png');
      expect(meta.width).toBe(image.width);
      expect(meta.height).toBe(image.height);
      expect(Math.max(image.width, image.height)).toBeGreaterThanOrEqual(900);
      expect(Math.max(image.width, image.height)).toBeLessThanOrEqual(1200);
      expect(item.fileName.endsWith(image.mime === 'image/jpeg' ? '.jpg' : '.png')).toBe(true);
      expect(elapsed).toBeLessThan(1000);
    });
  }

  it('gives the same SVG for the same scene', () => {
    const item = allItems[5]!;
    expect(renderScene(item.scene)).toBe(renderScene(item.scene));
  });
});
