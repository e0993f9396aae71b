/**
 * Checks a IIIF Presentation API 3.0 Manifest against the requirements of the specification
 * (https://iiif.io/api/presentation/3.0/), written from its text. Section numbers are those of the 3.0
 * document as remembered (from memory); each rule quotes what it checks. Returns every violation, so a
 * test can show them all.
 */
type Json = Record<string, unknown>;

const isObj = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v);
const isHttpUri = (v: unknown) => typeof v === 'string' && /^https?:\/\/[^\s#]+(#\S*)?$/.test(v);
// BCP 47 language tag, loosely (RFC 5646 §2.1 shape: letters and digits in hyphen-separated subtags), or "none"
const isLanguageKey = (k: string) => k === 'none' || /^[A-Za-z]{2,8}(-[A-Za-z0-9]{1,8})*$/.test(k);

export const PRESENTATION_CONTEXT = 'http://iiif.io/api/presentation/3/context.json';

export function presentationViolations(manifest: unknown): string[] {
  const out: string[] = [];
  const v = (ok: boolean, rule: string) => void (ok || out.push(rule));

  // §4.4 Language of Property Values: "a JSON object … keys … MUST be a BCP 47 language code, or 'none'; the value MUST be an array of strings"
  const languageMap = (value: unknown, where: string) => {
    v(isObj(value) && Object.keys(value).length > 0, `${where}: a language map (JSON object) with at least one entry (§4.4)`);
    if (!isObj(value)) return;
    for (const [k, vals] of Object.entries(value)) {
      v(isLanguageKey(k), `${where}: key "${k}" is a BCP 47 language code or "none" (§4.4)`);
      v(Array.isArray(vals) && vals.every((s) => typeof s === 'string'), `${where}["${k}"]: an array of strings (§4.4)`);
    }
  };
  // §3.2 id: "MUST be a string … an HTTP(S) URI"; type: "All resource types MUST have the type property"
  const identity = (r: Json, type: string, where: string, opts: { noFragment?: boolean } = {}) => {
    v(isHttpUri(r.id), `${where}.id: an HTTP(S) URI (§3.2 id)`);
    if (opts.noFragment) v(typeof r.id === 'string' && !r.id.includes('#'), `${where}.id: no fragment (§3.2 id: Canvas ids "MUST NOT contain a fragment")`);
    v(r.type === type, `${where}.type: "${type}" (§3.2 type)`);
  };
  // §3.1 metadata: "an array of JSON objects, where each item in the array has both label and value properties", both language maps
  const metadata = (m: unknown, where: string) => {
    if (m === undefined) return;
    v(Array.isArray(m), `${where}.metadata: an array (§3.1 metadata)`);
    if (Array.isArray(m)) m.forEach((e, i) => {
      v(isObj(e) && 'label' in e && 'value' in e, `${where}.metadata[${i}]: has label and value (§3.1 metadata)`);
      if (isObj(e)) {
        languageMap(e.label, `${where}.metadata[${i}].label`);
        languageMap(e.value, `${where}.metadata[${i}].value`);
      }
    });
  };
  // §3.2 height/width: positive integers; "If it has width, it MUST have height", and the reverse
  const dimensions = (r: Json, where: string, required: boolean) => {
    const has = r.width !== undefined || r.height !== undefined;
    if (required) v(has, `${where}: width and height (§5.3 Canvas: a Canvas with spatial extent has height and width)`);
    if (has) {
      v(Number.isInteger(r.width) && (r.width as number) > 0, `${where}.width: a positive integer (§3.2 width)`);
      v(Number.isInteger(r.height) && (r.height as number) > 0, `${where}.height: a positive integer (§3.2 height)`);
    }
  };

  if (!isObj(manifest)) return ['the Manifest is a JSON object'];
  // §4.6 Linked Data Context: the top-level resource MUST have @context; the Presentation context comes last
  const ctx = manifest['@context'];
  v(ctx === PRESENTATION_CONTEXT || (Array.isArray(ctx) && ctx[ctx.length - 1] === PRESENTATION_CONTEXT), '@context: the Presentation 3 context, last (§4.6)');
  identity(manifest, 'Manifest', 'Manifest');
  // §3.1 label: "A Manifest MUST have the label property with at least one entry"
  languageMap(manifest.label, 'Manifest.label');
  if (manifest.summary !== undefined) languageMap(manifest.summary, 'Manifest.summary');
  metadata(manifest.metadata, 'Manifest');
  // §3.4 items: "A Manifest MUST have the items property with at least one item. The items MUST be Canvases"
  const canvases = manifest.items;
  v(Array.isArray(canvases) && canvases.length > 0, 'Manifest.items: at least one Canvas (§3.4 items)');
  const canvasIds = new Set<string>();
  if (Array.isArray(canvases)) canvases.forEach((c, ci) => {
    const w = `items[${ci}]`;
    if (!isObj(c)) return void out.push(`${w}: a JSON object`);
    identity(c, 'Canvas', w, { noFragment: true });
    v(!canvasIds.has(String(c.id)), `${w}.id: unique within the Manifest`);
    canvasIds.add(String(c.id));
    // §3.1 label: "A Canvas SHOULD have the label property" — held to here as a must
    languageMap(c.label, `${w}.label`);
    metadata(c.metadata, w);
    dimensions(c, w, true);
    // §3.1 thumbnail: "an array of JSON objects, each of which MUST have the id and type properties"
    if (c.thumbnail !== undefined) {
      v(Array.isArray(c.thumbnail) && c.thumbnail.every((t) => isObj(t) && isHttpUri(t.id) && typeof t.type === 'string'), `${w}.thumbnail: content resources with id and type (§3.1 thumbnail)`);
    }
    // §3.4 items: "A Canvas SHOULD have the items property with at least one item. The items MUST be Annotation Pages"
    const pages = c.items;
    v(Array.isArray(pages) && pages.length > 0, `${w}.items: at least one AnnotationPage (§3.4 items)`);
    const pageList = (list: unknown, where: string, wantMotivation: 'painting' | null) => {
      if (!Array.isArray(list)) return;
      list.forEach((p, pi) => {
        const pw = `${where}[${pi}]`;
        if (!isObj(p)) return void out.push(`${pw}: a JSON object`);
        identity(p, 'AnnotationPage', pw);
        v(Array.isArray(p.items) && p.items.length > 0, `${pw}.items: at least one Annotation (§3.4 items)`);
        if (Array.isArray(p.items)) p.items.forEach((a, ai) => {
          const aw = `${pw}.items[${ai}]`;
          if (!isObj(a)) return void out.push(`${aw}: a JSON object`);
          identity(a, 'Annotation', aw);
          // §5.6 Annotation (W3C Web Annotation Data Model): motivation, body and target
          v(typeof a.motivation === 'string', `${aw}.motivation: a string (§3.2 motivation)`);
          if (wantMotivation) v(a.motivation === wantMotivation, `${aw}.motivation: "painting" for content of a Canvas (§3.4 items: "content … associated with a Canvas via an Annotation that has the motivation painting")`);
          v(typeof a.target === 'string' && String(a.target).split('#')[0] === c.id, `${aw}.target: the Canvas (§5.6)`);
          const body = a.body;
          v(isObj(body), `${aw}.body: a content resource (§5.6)`);
          if (!isObj(body)) return;
          if (a.motivation === 'painting') {
            identity(body, 'Image', `${aw}.body`);
            // §3.2 format: "the value MUST be a string, and it SHOULD be the value of the Content-Type header"
            v(typeof body.format === 'string' && /^image\/[a-z0-9.+-]+$/.test(String(body.format)), `${aw}.body.format: an image media type (§3.2 format)`);
            dimensions(body, `${aw}.body`, true);
          } else {
            // W3C Web Annotation Data Model §3.2.4 Embedded Textual Body: type TextualBody, value MUST
            v(body.type === 'TextualBody' && typeof body.value === 'string', `${aw}.body: a TextualBody with a value (Web Annotation §3.2.4)`);
            if (body.language !== undefined) v(typeof body.language === 'string' && isLanguageKey(String(body.language)), `${aw}.body.language: a BCP 47 tag (Web Annotation §3.2.4)`);
          }
        });
      });
    };
    pageList(pages, `${w}.items`, 'painting');
    // §3.4 annotations: "the value MUST be an array of JSON objects. Each item MUST have the id and type properties, and the type MUST be AnnotationPage"
    if (c.annotations !== undefined) {
      v(Array.isArray(c.annotations), `${w}.annotations: an array of AnnotationPages (§3.4 annotations)`);
      pageList(c.annotations, `${w}.annotations`, null);
    }
  });
  return out;
}

/** Every id of a Manifest with the type it names, for dereferencing. */
export function everyId(node: unknown, out: Array<{ id: string; type: string }> = []): Array<{ id: string; type: string }> {
  if (Array.isArray(node)) for (const n of node) everyId(n, out);
  else if (isObj(node)) {
    if (typeof node.id === 'string' && typeof node.type === 'string') out.push({ id: node.id, type: node.type });
    for (const [k, v] of Object.entries(node)) if (k !== 'id') everyId(v, out);
  }
  return out;
}
