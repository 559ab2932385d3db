import { describe, expect, test } from 'vitest';
import { recogniseHeader } from '~/lib/lab-csv/column-recognition';
import {
  detectHeaderLanguages,
  HEADER_LANGUAGES,
  HEADER_TERMS,
  parseLocalMonthDate,
  translateHeader,
  type HeaderLanguage,
} from '~/lib/lab-csv/header-dictionary';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';

// One small report per language, as a lab there might write it (invented layouts; decimal commas and
// day-first dates where the language uses them). Each must read to the same bottles and readings.
const REPORTS: Record<HeaderLanguage, string> = {
  de: 'Probennummer;Datum der Probenahme;Eisen;Aluminium;Kupfer;Silizium;Viskosität 100 °C;Kraftstoff %;Wasser %;Glykol;Basenzahl (mg KOH/g)\nVS-1;03.04.2026;12;3;<1;6;13,4;0,8;0,05;negativ;7,5\nVS-2;10.04.2026;15;4;2;7;12,9;1,2;0,1;positiv;\n',
  fr: 'N° échantillon;Date de prélèvement;Fer;Aluminium;Cuivre;Silicium;Viscosité à 100 °C;Carburant %;Eau %;Glycol;Indice de base (mg KOH/g)\nVS-1;03/04/2026;12;3;<1;6;13,4;0,8;0,05;négatif;7,5\nVS-2;10/04/2026;15;4;2;7;12,9;1,2;0,1;positif;\n',
  es: 'Nº de muestra;Fecha de muestreo;Hierro;Aluminio;Cobre;Silicio;Viscosidad a 100 °C;Combustible %;Agua %;Glicol;Número de base (mg KOH/g)\nVS-1;03/04/2026;12;3;<1;6;13,4;0,8;0,05;no;7,5\nVS-2;10/04/2026;15;4;2;7;12,9;1,2;0,1;sí;\n',
  it: 'Campione;Data prelievo;Ferro;Alluminio;Rame;Silicio;Viscosità a 100 °C;Carburante %;Acqua %;Glicole;Numero di base (mg KOH/g)\nVS-1;03/04/2026;12;3;<1;6;13,4;0,8;0,05;no;7,5\nVS-2;10/04/2026;15;4;2;7;12,9;1,2;0,1;sì;\n',
  nl: 'Monsternummer;Datum monstername;IJzer;Aluminium;Koper;Silicium;Viscositeit bij 100 °C;Brandstof %;Water %;Glycol;Basegetal (mg KOH/g)\nVS-1;03-04-2026;12;3;<1;6;13,4;0,8;0,05;nee;7,5\nVS-2;10-04-2026;15;4;2;7;12,9;1,2;0,1;ja;\n',
  pt: 'Amostra;Data da coleta;Ferro;Alumínio;Cobre;Silício;Viscosidade a 100 °C;Combustível %;Água %;Glicol;Número de base (mg KOH/g)\nVS-1;03/04/2026;12;3;<1;6;13,4;0,8;0,05;não;7,5\nVS-2;10/04/2026;15;4;2;7;12,9;1,2;0,1;sim;\n',
  sv: 'Provnummer;Provtagningsdatum;Järn;Aluminium;Koppar;Kisel;Viskositet 100 °C;Bränsle %;Vatten %;Glykol;Bastal (mg KOH/g)\nVS-1;2026-04-03;12;3;<1;6;13,4;0,8;0,05;nej;7,5\nVS-2;2026-04-10;15;4;2;7;12,9;1,2;0,1;ja;\n',
};

describe('a report in each language reads to the same readings', () => {
  test.each(Object.keys(REPORTS) as HeaderLanguage[])('%s', (language) => {
    const result = parseLabCsv(REPORTS[language]);
    expect(result.columns.map((c) => (c.kind === 'measurand' ? c.code : c.kind))).toEqual([
      'bottle',
      'sampled',
      'Fe',
      'Al',
      'Cu',
      'Si',
      'KV100',
      'FUEL',
      'WATER',
      'GLYCOL',
      'TBN',
    ]);
    expect(result.decimalMark).toBe(',');
    const [first, second] = result.rows;
    expect(first?.bottle.raw).toBe('VS-1');
    // 03/04/2026 is 3 April: day first, as every one of these languages writes it.
    expect(first?.sampled).toBe('2026-04-03');
    expect(second?.sampled).toBe('2026-04-10');
    expect(first?.readings).toMatchObject({
      Fe: { value: 12 },
      Al: { value: 3 },
      Cu: { value: 1, qualifier: '<' },
      Si: { value: 6 },
      KV100: { value: 13.4 },
      FUEL: { value: 0.8 },
      WATER: { value: 0.05 },
    });
    expect(second?.readings.KV100?.value).toBe(12.9);
    expect(first?.readings.TBN?.value).toBe(7.5);
    expect(second?.readings.TBN).toBeUndefined();
    expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
  });
});

describe('glycol words of these languages', () => {
  // The first bottle's glycol word is negative, the second's positive, in each language's own words.
  test.each(Object.keys(REPORTS) as HeaderLanguage[])('%s', (language) => {
    const result = parseLabCsv(REPORTS[language]);
    expect(result.rows.map((r) => r.readings.GLYCOL?.value)).toEqual([0, 1]);
  });
});

describe('the words of the issue are recognised', () => {
  test.each([
    ['Eisen', 'Fe'],
    ['Fer', 'Fe'],
    ['Hierro', 'Fe'],
    ['Ferro', 'Fe'],
    ['IJzer', 'Fe'],
    ['Järn', 'Fe'],
    ['Viskosität 100 °C', 'KV100'],
    ['Kraftstoff', 'FUEL'],
    ['Probe', 'bottle'],
    ['Viskositätsindex', 'VI'],
    ['Point d’éclair °C', 'FLASH'],
    ["Point d'éclair °C", 'FLASH'],
    ['Punto di infiammabilità', 'FLASH'],
    ['Säurezahl', 'TAN'],
    ['Zuurgetal', 'TAN'],
    ['Kylvätska', 'GLYCOL'],
    ['Insolúveis %', 'INSOL'],
    ['Teneur en fer (mg/kg)', 'Fe'],
    ['Entnahmedatum', 'sampled'],
    ['Fecha de informe', 'reported'],
    ['Berichtsdatum', 'reported'],
    ['Provnummer', 'bottle'],
    ['Nº de muestra', 'bottle'],
  ])('%s → %s', (header, expected) => {
    const r = recogniseHeader(header);
    expect(r.kind === 'measurand' ? r.code : r.kind).toBe(expected);
  });
});

describe('the dictionary itself', () => {
  test('every term names its language and a source', () => {
    for (const term of HEADER_TERMS) {
      expect(Object.keys(HEADER_LANGUAGES)).toContain(term.language);
      expect(term.source.length, term.term).toBeGreaterThan(5);
    }
  });

  test('all seven languages are there, each with every element the reader knows in English', () => {
    for (const language of Object.keys(HEADER_LANGUAGES)) {
      expect(HEADER_TERMS.filter((t) => t.language === language).length, language).toBeGreaterThan(25);
    }
  });

  test('no term means two things', () => {
    const seen = new Map<string, string>();
    for (const t of HEADER_TERMS) {
      const key = t.term.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase();
      const earlier = seen.get(key);
      if (earlier !== undefined) expect(earlier, key).toBe(t.english);
      seen.set(key, t.english);
    }
  });

  test('English headers pass through unchanged and name no language', () => {
    for (const h of ['iron (fe) ppm', 'bottle code', 'viscosity 100 °c', 'date sampled', 'tbn']) {
      expect(translateHeader(h)).toEqual({ text: h, languages: [] });
    }
    expect(detectHeaderLanguages(['Bottle', 'Parameter', 'Result', 'Unit'])).toEqual([]);
  });

  test.each([
    ['3. März 2026', '2026-03-03'],
    ['3 avril 2026', '2026-04-03'],
    ['3 de abril de 2026', '2026-04-03'],
    ['12 dicembre 2026', '2026-12-12'],
    ['1 mei 2026', '2026-05-01'],
    ['5 de março de 2026', '2026-03-05'],
    ['7 maj 2026', '2026-05-07'],
    ['03-févr-26', '2026-02-03'],
  ])('month names: %s → %s', (cell, iso) => {
    const d = parseLocalMonthDate(cell);
    expect(d && `${d.year}-${String(d.month).padStart(2, '0')}-${String(d.day).padStart(2, '0')}`).toBe(iso);
  });

  test('a date with a month name is read in a report', () => {
    const result = parseLabCsv('Probe;Datum der Probenahme;Eisen\nA-1;3. März 2026;12\n');
    expect(result.rows[0]?.sampled).toBe('2026-03-03');
  });

  test('a profile still overrides the dictionary', () => {
    const result = parseLabCsv('Probe;Eisen;Kupfer\nA-1;12;3\n', { mapping: { Kupfer: 'ignore', Eisen: 'Cu' } });
    expect(result.rows[0]?.readings).toEqual({ Cu: { value: 12 } });
  });

  test('a profile date order wins over the language', () => {
    const result = parseLabCsv('Probe;Datum;Eisen\nA-1;03/04/2026;12\n'.replace('Datum', 'Probenahmedatum'), {
      dateOrder: 'mdy',
    });
    expect(result.rows[0]?.sampled).toBe('2026-03-04');
  });

  test('a day-first date settled by the language says so in a warning', () => {
    const result = parseLabCsv('Probe;Probenahmedatum;Eisen\nA-1;03/04/2026;12\n');
    expect(result.rows[0]?.sampled).toBe('2026-04-03');
    expect(result.errors.find((e) => e.code === 'ambiguous-date')).toMatchObject({
      severity: 'warning',
      message: expect.stringContaining('read day first, as German reports write them'),
    });
  });
});
