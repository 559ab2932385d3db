/**
 * One dictionary of lab report words in German, French, Spanish, Italian, Dutch, Portuguese and Swedish,
 * translated to the English words the column recogniser already reads ("Eisen" → "iron", "Viskosität" →
 * "viscosity", "Probenahmedatum" → "sampled date"). Element names are the ordinary names of the elements
 * in each language; the rest are the words labs and their customers use (common usage, no published
 * source) unless a source is named. Words spelled as in English (aluminium, nickel, glycol, water …)
 * need no entry. A lab profile still overrides whatever this dictionary says.
 */
export type HeaderLanguage = 'de' | 'fr' | 'es' | 'it' | 'nl' | 'pt' | 'sv';

export const HEADER_LANGUAGES: Readonly<Record<HeaderLanguage, string>> = {
  de: 'German',
  fr: 'French',
  es: 'Spanish',
  it: 'Italian',
  nl: 'Dutch',
  pt: 'Portuguese',
  sv: 'Swedish',
};

export interface HeaderTerm {
  /** As a lab writes it (case and accents do not matter when matching). */
  term: string;
  language: HeaderLanguage;
  /** English words the recogniser reads. */
  english: string;
  source: string;
}

const COMMON = 'common usage';
const ELEMENT = "the element's ordinary name in that language (common usage)";

type Row = [english: string, source: string, terms: Partial<Record<HeaderLanguage, string | string[]>>];

// One row per meaning: English words, where the terms come from, and the terms per language.
const ROWS: readonly Row[] = [
  ['iron', ELEMENT, { de: 'Eisen', fr: 'fer', es: 'hierro', it: 'ferro', nl: 'ijzer', pt: 'ferro', sv: 'järn' }],
  ['aluminium', ELEMENT, { es: 'aluminio', it: 'alluminio', pt: 'alumínio' }],
  ['chromium', ELEMENT, { de: 'Chrom', es: 'cromo', it: 'cromo', nl: 'chroom', pt: ['cromo', 'crómio'], sv: 'krom' }],
  ['copper', ELEMENT, { de: 'Kupfer', fr: 'cuivre', es: 'cobre', it: 'rame', nl: 'koper', pt: 'cobre', sv: 'koppar' }],
  ['lead', ELEMENT, { de: 'Blei', fr: 'plomb', es: 'plomo', it: 'piombo', nl: 'lood', pt: 'chumbo', sv: 'bly' }],
  ['tin', ELEMENT, { de: 'Zinn', fr: 'étain', es: 'estaño', it: 'stagno', pt: 'estanho', sv: 'tenn' }],
  ['nickel', ELEMENT, { es: 'níquel', it: 'nichel', nl: 'nikkel', pt: 'níquel' }],
  ['silver', ELEMENT, { de: 'Silber', fr: 'argent', es: 'plata', it: 'argento', nl: 'zilver', pt: 'prata' }],
  [
    'titanium',
    ELEMENT,
    { de: 'Titan', fr: 'titane', es: 'titanio', it: 'titanio', nl: 'titaan', pt: 'titânio', sv: 'titan' },
  ],
  ['vanadium', ELEMENT, { es: 'vanadio', it: 'vanadio', pt: 'vanádio', sv: 'vanadin' }],
  [
    'manganese',
    ELEMENT,
    { de: 'Mangan', fr: 'manganèse', es: 'manganeso', nl: 'mangaan', pt: 'manganês', sv: 'mangan' },
  ],
  [
    'silicon',
    ELEMENT,
    {
      de: ['Silizium', 'Silicium'],
      fr: 'silicium',
      es: 'silicio',
      it: 'silicio',
      nl: 'silicium',
      pt: 'silício',
      sv: 'kisel',
    },
  ],
  ['sodium', ELEMENT, { de: 'Natrium', es: 'sodio', it: 'sodio', nl: 'natrium', pt: 'sódio', sv: 'natrium' }],
  ['potassium', ELEMENT, { de: 'Kalium', es: 'potasio', it: 'potassio', nl: 'kalium', pt: 'potássio', sv: 'kalium' }],
  ['boron', ELEMENT, { de: 'Bor', fr: 'bore', es: 'boro', it: 'boro', nl: 'boor', pt: 'boro', sv: 'bor' }],
  [
    'molybdenum',
    ELEMENT,
    {
      de: 'Molybdän',
      fr: 'molybdène',
      es: 'molibdeno',
      it: 'molibdeno',
      nl: 'molybdeen',
      pt: ['molibdénio', 'molibdênio'],
      sv: 'molybden',
    },
  ],
  ['zinc', ELEMENT, { de: 'Zink', it: 'zinco', nl: 'zink', pt: 'zinco', sv: 'zink' }],
  [
    'phosphorus',
    ELEMENT,
    { de: 'Phosphor', fr: 'phosphore', es: 'fósforo', it: 'fosforo', nl: 'fosfor', pt: 'fósforo', sv: 'fosfor' },
  ],
  ['calcium', ELEMENT, { es: 'calcio', it: 'calcio', pt: 'cálcio', sv: 'kalcium' }],
  ['magnesium', ELEMENT, { fr: 'magnésium', es: 'magnesio', it: 'magnesio', pt: 'magnésio' }],
  ['barium', ELEMENT, { fr: 'baryum', es: 'bario', it: 'bario', pt: 'bário' }],
  [
    'sulfur',
    ELEMENT,
    { de: 'Schwefel', fr: 'soufre', es: 'azufre', it: 'zolfo', nl: 'zwavel', pt: 'enxofre', sv: 'svavel' },
  ],

  [
    'viscosity',
    COMMON,
    {
      de: 'Viskosität',
      fr: 'viscosité',
      es: 'viscosidad',
      it: 'viscosità',
      nl: 'viscositeit',
      pt: 'viscosidade',
      sv: 'viskositet',
    },
  ],
  [
    'viscosity index',
    'the titles of the national editions of ISO 2909 (from memory)',
    {
      de: ['Viskositätsindex', 'Viskosität Index'],
      fr: 'indice de viscosité',
      es: 'índice de viscosidad',
      it: 'indice di viscosità',
      nl: 'viscositeitsindex',
      pt: 'índice de viscosidade',
      sv: 'viskositetsindex',
    },
  ],
  [
    'fuel',
    COMMON,
    {
      de: ['Kraftstoff', 'Kraftstoffverdünnung', 'Treibstoff', 'Kraftstoffeintrag'],
      fr: ['carburant', 'dilution carburant', 'dilution par carburant'],
      es: ['combustible', 'dilución por combustible', 'dilución combustible'],
      it: ['carburante', 'diluizione carburante', 'combustibile'],
      nl: ['brandstof', 'brandstofverdunning'],
      pt: ['combustível', 'diluição por combustível', 'diluição combustível'],
      sv: ['bränsle', 'bränsleutspädning'],
    },
  ],
  ['water', COMMON, { de: ['Wasser', 'Wassergehalt'], fr: 'eau', es: 'agua', it: 'acqua', pt: 'água', sv: 'vatten' }],
  [
    'glycol',
    COMMON,
    {
      de: ['Glykol', 'Kühlmittel', 'Frostschutz'],
      fr: 'liquide de refroidissement',
      es: ['glicol', 'refrigerante'],
      it: ['glicole', 'liquido refrigerante'],
      nl: 'koelvloeistof',
      pt: ['glicol', 'líquido de arrefecimento', 'líquido de refrigeração'],
      sv: ['glykol', 'kylvätska'],
    },
  ],
  [
    'flash point',
    'the titles of the national editions of ISO 2592 (from memory)',
    {
      de: 'Flammpunkt',
      fr: "point d'éclair",
      es: 'punto de inflamación',
      it: 'punto di infiammabilità',
      nl: 'vlampunt',
      pt: 'ponto de fulgor',
      sv: 'flampunkt',
    },
  ],
  [
    'insolubles',
    COMMON,
    { de: ['Unlösliches', 'unlösliche'], it: 'insolubili', nl: 'onoplosbare', pt: 'insolúveis', sv: 'olösliga' },
  ],
  [
    'base number',
    COMMON,
    {
      de: ['Basenzahl', 'Gesamtbasenzahl'],
      fr: 'indice de base',
      es: ['número de base', 'número básico'],
      it: ['numero di base', 'numero di basicità'],
      nl: 'basegetal',
      pt: 'número de base',
      sv: ['bastal', 'basnummer'],
    },
  ],
  [
    'acid number',
    COMMON,
    {
      de: ['Säurezahl', 'Neutralisationszahl'],
      fr: "indice d'acide",
      es: ['número ácido', 'número de acidez'],
      it: ['numero di acidità', 'numero di acido'],
      nl: 'zuurgetal',
      pt: 'número de acidez',
      sv: 'syratal',
    },
  ],

  [
    'sample',
    COMMON,
    { de: 'Probe', fr: 'échantillon', es: 'muestra', it: 'campione', nl: 'monster', pt: 'amostra', sv: 'prov' },
  ],
  [
    'sample number',
    COMMON,
    {
      de: ['Probennummer', 'Probennr', 'Proben-Nr', 'Probenbezeichnung'],
      nl: ['monsternummer', 'monstercode'],
      sv: 'provnummer',
    },
  ],
  [
    'bottle',
    COMMON,
    {
      de: 'Flasche',
      fr: 'flacon',
      es: ['frasco', 'botella'],
      it: ['flacone', 'bottiglia'],
      nl: 'fles',
      pt: 'frasco',
      sv: 'flaska',
    },
  ],
  ['bottle number', COMMON, { de: 'Flaschennummer', nl: 'flesnummer', sv: 'flasknummer' }],
  ['date', COMMON, { de: 'Datum', es: 'fecha', it: 'data', nl: 'datum', pt: 'data', sv: 'datum' }],
  [
    'sampled',
    COMMON,
    {
      de: ['Probenahme', 'Entnahme', 'entnommen'],
      fr: 'prélèvement',
      es: ['muestreo', 'toma de muestra', 'toma'],
      it: ['prelievo', 'campionamento'],
      nl: ['monstername', 'bemonsterd', 'bemonstering'],
      pt: ['coleta', 'colheita', 'amostragem'],
      sv: ['provtagning', 'provtagen', 'provtaget'],
    },
  ],
  [
    'sampled date',
    COMMON,
    { de: ['Probenahmedatum', 'Entnahmedatum'], nl: 'bemonsteringsdatum', sv: 'provtagningsdatum' },
  ],
  [
    'reported',
    COMMON,
    {
      de: 'Bericht',
      fr: 'rapport',
      es: 'informe',
      it: ['rapporto', 'referto'],
      nl: 'rapport',
      pt: ['relatório', 'laudo'],
      sv: 'rapport',
    },
  ],
  [
    'reported date',
    COMMON,
    {
      de: ['Berichtsdatum', 'Prüfdatum', 'Analysedatum', 'Analysendatum'],
      nl: 'rapportdatum',
      sv: ['rapportdatum', 'analysdatum'],
    },
  ],
  ['tested', COMMON, { fr: 'analyse', es: 'análisis', it: 'analisi', pt: 'análise', sv: 'analys' }],
  [
    'number',
    COMMON,
    {
      de: ['Nummer', 'Nr'],
      fr: 'numéro',
      es: ['número', 'núm'],
      it: ['numero', 'num'],
      nl: ['nummer', 'nr'],
      pt: 'número',
      sv: ['nummer', 'nr'],
    },
  ],
  [
    'content',
    COMMON,
    { de: 'Gehalt', fr: 'teneur', es: 'contenido', it: 'contenuto', nl: 'gehalte', pt: 'teor', sv: 'halt' },
  ],

  // Words of a one-row-per-test file (see long-format.ts).
  [
    'test',
    COMMON,
    {
      de: ['Prüfung', 'Prüfparameter', 'Parameter', 'Analyt', 'Merkmal'],
      fr: ['paramètre', 'essai', 'élément'],
      es: ['parámetro', 'ensayo', 'prueba', 'elemento'],
      it: ['parametro', 'prova', 'analita', 'elemento'],
      nl: ['parameter', 'bepaling', 'element'],
      pt: ['parâmetro', 'ensaio', 'elemento'],
      sv: ['parameter', 'element'],
    },
  ],
  [
    'result',
    COMMON,
    {
      de: ['Ergebnis', 'Wert', 'Messwert'],
      fr: ['résultat', 'valeur'],
      es: ['resultado', 'valor'],
      it: ['risultato', 'valore'],
      nl: ['resultaat', 'waarde', 'uitslag'],
      pt: ['resultado', 'valor'],
      sv: ['resultat', 'värde'],
    },
  ],
  [
    'unit',
    COMMON,
    { de: 'Einheit', fr: 'unité', es: 'unidad', it: 'unità', nl: 'eenheid', pt: 'unidade', sv: 'enhet' },
  ],
];

/** Every term of the dictionary, flat, for the tests and for anyone reading what is recognised. */
export const HEADER_TERMS: readonly HeaderTerm[] = ROWS.flatMap(([english, source, terms]) =>
  (Object.entries(terms) as [HeaderLanguage, string | string[]][]).flatMap(([language, t]) =>
    (Array.isArray(t) ? t : [t]).map((term) => ({ term, language, english, source })),
  ),
);

/** Articles and prepositions that join the words of a header in these languages; dropped once a term is found. */
const JOINING_WORDS = new Set([
  'de',
  'du',
  'des',
  'd',
  'la',
  'le',
  'les',
  'l',
  'el',
  'lo',
  'los',
  'di',
  'del',
  'della',
  'dello',
  'da',
  'do',
  'dos',
  'das',
  'der',
  'die',
  'dem',
  'den',
  'het',
  'van',
  'en',
  'et',
  'und',
  'y',
  'e',
  'och',
  'av',
  'for',
  'im',
  'am',
  'zum',
  'zur',
  'par',
  'por',
  'per',
  'pour',
  'para',
  'op',
  'voor',
  'i',
  'o',
  'em',
  'au',
  'a',
  'bei',
  'bij',
  'vid',
]);

/** Terms that are English words too: they translate, but say nothing about the report's language. */
const ALSO_ENGLISH = new Set(['parameter', 'element', 'rapport', 'analyse', 'data']);

/** Lower case without accents: "Viskosität" and "viskositat" meet. */
function fold(word: string): string {
  return word.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase();
}

interface Entry {
  english: string;
  /** Null for a term that is also an English word. */
  language: HeaderLanguage | null;
}

/** Match keys: the term's words, folded, without joining words, joined by one space. */
function keyOf(term: string): string {
  return (term.match(/\p{L}+/gu) ?? [])
    .map(fold)
    .filter((w) => !JOINING_WORDS.has(w))
    .join(' ');
}

const ENTRIES = new Map<string, Entry>();
let longestPhrase = 1;
for (const t of HEADER_TERMS) {
  const key = keyOf(t.term);
  if (key === '') continue;
  if (!ENTRIES.has(key)) ENTRIES.set(key, { english: t.english, language: ALSO_ENGLISH.has(key) ? null : t.language });
  longestPhrase = Math.max(longestPhrase, key.split(' ').length);
}

export interface TranslatedHeader {
  text: string;
  /** Languages whose terms were found; empty for an English (or unrecognised) header. */
  languages: HeaderLanguage[];
}

/**
 * Translate a header's words to the English the recogniser reads. Numbers, units and symbols stay where
 * they are; a header without any dictionary term comes back unchanged. Linear in the header's length.
 */
export function translateHeader(text: string): TranslatedHeader {
  // "N°" and "Nº" (number sign) before a word: read as "no" so "N° échantillon" is a sample number.
  const source = text.replace(/(^|[^\p{L}])n\s?[°º]/giu, '$1no ');
  const words = [...source.matchAll(/\p{L}+/gu)];
  if (words.length === 0) return { text, languages: [] };
  const folded = words.map((m) => fold(m[0]));
  const languages = new Set<HeaderLanguage>();
  let out = '';
  let last = 0;
  let i = 0;
  let found = false;
  const pieces: { start: number; end: number; replacement: string }[] = [];
  while (i < words.length) {
    // Greedy longest phrase over the next words, skipping joining words inside it.
    let matched: { entry: Entry; next: number } | null = null;
    const parts: string[] = [];
    let j = i;
    while (j < words.length && parts.length < longestPhrase) {
      const w = folded[j] ?? '';
      j += 1;
      if (JOINING_WORDS.has(w) && parts.length > 0) continue;
      parts.push(w);
      const entry = ENTRIES.get(parts.join(' '));
      if (entry) matched = { entry, next: j };
    }
    const first = words[i];
    if (matched && first?.index !== undefined) {
      const lastWord = words[matched.next - 1];
      const end = (lastWord?.index ?? 0) + (lastWord?.[0].length ?? 0);
      pieces.push({ start: first.index, end, replacement: matched.entry.english });
      if (matched.entry.language) languages.add(matched.entry.language);
      found = true;
      i = matched.next;
    } else {
      i += 1;
    }
  }
  if (!found) return { text, languages: [] };
  // Rebuild: translated spans in English, joining words dropped, other words without accents.
  const replaced = new Map(pieces.map((p) => [p.start, p]));
  for (let k = 0; k < words.length; k += 1) {
    const m = words[k];
    if (!m || m.index === undefined || m.index < last) continue;
    out += source.slice(last, m.index);
    const piece = replaced.get(m.index);
    if (piece) {
      out += piece.replacement;
      last = piece.end;
      continue;
    }
    const w = folded[k] ?? '';
    out += JOINING_WORDS.has(w) ? ' ' : w;
    last = m.index + m[0].length;
  }
  out += source.slice(last);
  return { text: out, languages: [...languages] };
}

/** The languages of a header row's dictionary terms (an English row gives none). */
export function detectHeaderLanguages(cells: readonly string[]): HeaderLanguage[] {
  const found = new Set<HeaderLanguage>();
  for (const cell of cells)
    for (const l of translateHeader(cell.normalize('NFKC').toLowerCase()).languages) found.add(l);
  return [...found];
}

/**
 * Every one of these languages writes numeric dates day first (03.04.2026, 03/04/2026) and, in running
 * text and in most exported reports, a decimal comma (common usage, no published source).
 */
export const DAY_FIRST_LANGUAGES: ReadonlySet<HeaderLanguage> = new Set(['de', 'fr', 'es', 'it', 'nl', 'pt', 'sv']);

/** Month names and their usual abbreviations in each language, folded (common usage). */
const MONTH_WORDS: Readonly<Record<string, number>> = Object.fromEntries(
  (
    [
      // German
      ['januar', 1],
      ['jan', 1],
      ['jän', 1],
      ['jänner', 1],
      ['februar', 2],
      ['feb', 2],
      ['märz', 3],
      ['mär', 3],
      ['mrz', 3],
      ['april', 4],
      ['apr', 4],
      ['mai', 5],
      ['juni', 6],
      ['jun', 6],
      ['juli', 7],
      ['jul', 7],
      ['august', 8],
      ['aug', 8],
      ['september', 9],
      ['sep', 9],
      ['sept', 9],
      ['oktober', 10],
      ['okt', 10],
      ['november', 11],
      ['nov', 11],
      ['dezember', 12],
      ['dez', 12],
      // French
      ['janvier', 1],
      ['janv', 1],
      ['février', 2],
      ['févr', 2],
      ['fév', 2],
      ['mars', 3],
      ['avril', 4],
      ['avr', 4],
      ['juin', 6],
      ['juillet', 7],
      ['juil', 7],
      ['août', 8],
      ['septembre', 9],
      ['octobre', 10],
      ['oct', 10],
      ['novembre', 11],
      ['décembre', 12],
      ['déc', 12],
      // Spanish
      ['enero', 1],
      ['ene', 1],
      ['febrero', 2],
      ['marzo', 3],
      ['abril', 4],
      ['abr', 4],
      ['mayo', 5],
      ['may', 5],
      ['junio', 6],
      ['julio', 7],
      ['agosto', 8],
      ['ago', 8],
      ['septiembre', 9],
      ['setiembre', 9],
      ['set', 9],
      ['octubre', 10],
      ['noviembre', 11],
      ['diciembre', 12],
      ['dic', 12],
      // Italian
      ['gennaio', 1],
      ['gen', 1],
      ['febbraio', 2],
      ['marzo', 3],
      ['aprile', 4],
      ['maggio', 5],
      ['mag', 5],
      ['giugno', 6],
      ['giu', 6],
      ['luglio', 7],
      ['lug', 7],
      ['settembre', 9],
      ['ottobre', 10],
      ['ott', 10],
      ['dicembre', 12],
      // Dutch
      ['januari', 1],
      ['februari', 2],
      ['maart', 3],
      ['mrt', 3],
      ['mei', 5],
      ['augustus', 8],
      // Portuguese
      ['janeiro', 1],
      ['fevereiro', 2],
      ['fev', 2],
      ['março', 3],
      ['maio', 5],
      ['junho', 6],
      ['julho', 7],
      ['setembro', 9],
      ['outubro', 10],
      ['out', 10],
      ['dezembro', 12],
      // Swedish
      ['mars', 3],
      ['maj', 5],
      ['augusti', 8],
      ['oktober', 10],
      ['december', 12],
      ['dec', 12],
    ] as const
  ).map(([name, month]) => [fold(name), month]),
);

/** A date written with a month name in one of these languages: "3. März 2026", "3 de abril de 2026", "03-avr-2026". */
export function parseLocalMonthDate(cell: string): { year: number; month: number; day: number } | null {
  if (cell.length > 40) return null;
  const words = fold(cell.trim()).match(/\p{L}+|\d+/gu);
  if (!words) return null;
  const parts = words.filter((w) => !JOINING_WORDS.has(w));
  if (parts.length !== 3) return null;
  const [dayText, monthText, yearText] = parts;
  if (dayText === undefined || monthText === undefined || yearText === undefined) return null;
  if (!/^\d{1,2}$/.test(dayText) || !/^(\d{4}|\d{2})$/.test(yearText)) return null;
  const month = MONTH_WORDS[monthText];
  if (month === undefined) return null;
  const year = yearText.length === 2 ? 2000 + Number(yearText) : Number(yearText);
  return { year, month, day: Number(dayText) };
}

/** Glycol (coolant) results in these languages, folded: positive → 1, negative → 0 (common usage). */
const GLYCOL_WORDS: Readonly<Record<string, 0 | 1>> = Object.fromEntries(
  (
    [
      ['positiv', 1],
      ['negativ', 0],
      ['nachgewiesen', 1],
      ['nicht nachgewiesen', 0],
      ['ja', 1],
      ['nein', 0],
      ['positif', 1],
      ['negatif', 0],
      ['oui', 1],
      ['non', 0],
      ['detecte', 1],
      ['non detecte', 0],
      ['positivo', 1],
      ['negativo', 0],
      ['si', 1],
      ['detectado', 1],
      ['no detectado', 0],
      ['rilevato', 1],
      ['non rilevato', 0],
      ['positief', 1],
      ['negatief', 0],
      ['nee', 0],
      ['aangetoond', 1],
      ['niet aangetoond', 0],
      ['sim', 1],
      ['nao', 0],
      ['nao detectado', 0],
      ['nej', 0],
      ['pavisad', 1],
      ['ej pavisad', 0],
      ['ej påvisad', 0],
    ] as const
  ).map(([word, value]) => [fold(word), value]),
);

/** A glycol cell in one of these languages ("negativ", "positif", "sì"), or null for the English reader to judge. */
export function readLocalGlycolWord(cell: string): 0 | 1 | null {
  if (cell.length > 40) return null;
  return GLYCOL_WORDS[fold(cell.trim()).replace(/\s+/g, ' ')] ?? null;
}
