import { describe, expect, it } from 'vitest'
import { classCodeOf, formatMK, formatTypeCode, LUMINOSITY_CLASSES, type MKValue, neighbourClass, neighbourType, parseMK, typeCodeOf, typeFromCode } from '../../../shared/mk'

function read(text: string): MKValue {
  const r = parseMK(text)
  if (!r.ok) throw new Error(`"${text}" did not parse: ${r.reason}`)
  return r.value
}

// Codes follow the scheme documented in shared/mk.ts (O0 = 0 … M0 = 60; Ia = 1 … V = 6).
describe('parseMK', () => {
  it.each([
    // text, letter, subtype, typeCode, luminosityClass, classCode
    ['A0V', 'A', 0, 20, 'V', 6],
    ['B8III', 'B', 8, 18, 'III', 4],
    ['K1.5IIIb', 'K', 1.5, 51.5, 'IIIb', 4.25],
    ['G2V', 'G', 2, 42, 'V', 6],
    ['O9.7Iab', 'O', 9.7, 9.7, 'Iab', 1.5],
    ['M2Ia', 'M', 2, 62, 'Ia', 1],
    ['B1Ia+', 'B', 1, 11, 'Ia+', 0.5],
    ['A0Ia0', 'A', 0, 20, 'Ia+', 0.5],
    ['F5VI', 'F', 5, 35, 'VI', 7],
    ['K0IIIa', 'K', 0, 50, 'IIIa', 3.75],
    ['A1.25V', 'A', 1.25, 21.25, 'V', 6],
  ])('reads %s as letter %s, subtype %s, code %s, class %s (%s)', (text, letter, subtype, code, cls, classCode) => {
    const v = read(text)
    expect(v.kind).toBe('mk')
    expect(v.letter).toBe(letter)
    expect(v.subtype).toBe(subtype)
    expect(v.typeCode).toBe(code)
    expect(v.luminosityClass).toBe(cls)
    expect(v.classCode).toBe(classCode)
  })

  it.each([
    ['G8/K0III', 49, [48, 50]],
    ['A0-A2V', 21, [20, 22]],
    ['B2-5V', 13.5, [12, 15]],
    ['O9.5/B0Ia', 9.75, [9.5, 10]],
    ['B9.5V', 19.5, undefined],
  ])('gives the type range %s the mean code %s and its ends', (text, code, range) => {
    const v = read(text)
    expect(v.typeCode).toBe(code)
    expect(v.typeRange).toEqual(range)
  })

  it.each([
    ['K0IV-V', 'IV-V', 5.5, [5, 6]],
    ['G8II/III', 'II/III', 3.5, [3, 4]],
    ['K3III-IIIb', 'III-IIIb', 4.125, [4, 4.25]],
    ['K2IIIa/IIIb', 'IIIa/IIIb', 4, [3.75, 4.25]],
    ['B1Ia-0', 'Ia-0', 0.5, [0, 1]],
    ['A0Ia/ab', 'Ia/Iab', 1.25, [1, 1.5]],
    ['M3Iab/b', 'Iab/Ib', 1.75, [1.5, 2]],
  ])('averages the intermediate class of %s (%s → %s)', (text, cls, code, range) => {
    const v = read(text)
    expect(v.luminosityClass).toBe(cls)
    expect(v.classCode).toBe(code)
    expect(v.classRange).toEqual(range)
  })

  it('marks a colon after the type or class as uncertain', () => {
    expect(read('B9:III').uncertain).toEqual({ prefix: false, type: true, class: false })
    expect(read('K3III:').uncertain).toEqual({ prefix: false, type: false, class: true })
    expect(read('sd:F5').uncertain).toEqual({ prefix: true, type: false, class: false })
  })

  it('reads a type or class in parentheses as uncertain, as catalogues write it', () => {
    const v = read('A(3)(V)')
    expect(v.subtype).toBe(3)
    expect(v.uncertain.type).toBe(true)
    expect(v.uncertain.class).toBe(true)
  })

  it('keeps peculiarity notes in order, with their parentheses', () => {
    expect(read('B2IVne').peculiarities).toEqual(['n', 'e'])
    expect(read('B9.5Vann').peculiarities).toEqual(['nn'])
    expect(read('A0VpSiSrCr').peculiarities).toEqual(['p', 'Si', 'Sr', 'Cr'])
    expect(read('B8IIIpHgMn').peculiarities).toEqual(['p', 'Hg', 'Mn'])
    expect(read('B8V(n)').peculiarities).toEqual(['(n)'])
  })

  it('reads shell, var and sharp-line notes as words', () => {
    expect(read('A1Vshell').peculiarities).toEqual(['shell'])
    expect(read('O7Iafpvar').peculiarities).toEqual(['f', 'p', 'var'])
    expect(read('B9Vsp').peculiarities).toEqual(['s', 'p'])
  })

  it('reads abundance notes with their strengths', () => {
    expect(read('G8IIIBa0.5').peculiarities).toEqual(['Ba0.5'])
    expect(read('F8VFe-1.3CH-0.8').peculiarities).toEqual(['Fe-1.3', 'CH-0.8'])
    expect(read('K0VCN+2').peculiarities).toEqual(['CN+2'])
    expect(read('G8IIICNIV').peculiarities).toEqual(['CNIV'])
    expect(read('K0VCN+2').composite).toBeUndefined()
  })

  it('reads the Am notation kA2hA5mA7 and takes the hydrogen type for the star', () => {
    const v = read('kA2hA5mA7V')
    expect(v.typeSource).toBe('h')
    expect(v.letter).toBe('A')
    expect(v.typeCode).toBe(25)
    expect(v.luminosityClass).toBe('V')
    expect(v.lineTypes.map((l) => l.feature)).toEqual(['k', 'h', 'm'])
  })

  it('reads the Am notation A3mA5-A7 as a K-line type and a metallic-line range', () => {
    const v = read('A3mA5-A7')
    expect(v.typeCode).toBe(23)
    expect(v.typeSource).toBeUndefined()
    expect(v.lineTypes).toHaveLength(1)
    expect(v.lineTypes[0]!.feature).toBe('m')
    expect(v.lineTypes[0]!.type.points.map((p) => p.subtype)).toEqual([5, 7])
  })

  it('splits a composite spectrum into the first star and its companions', () => {
    const v = read('A0V+G5III')
    expect(v.typeCode).toBe(20)
    expect(v.composite).toHaveLength(1)
    expect(v.composite![0]!.typeCode).toBe(45)
    expect(v.composite![0]!.luminosityClass).toBe('III')
  })

  it('tells a hypergiant class before a companion from the companion sign', () => {
    const v = read('G8Ia++B0Ibp:')
    expect(v.luminosityClass).toBe('Ia+')
    expect(v.composite![0]!.luminosityClass).toBe('Ib')
    expect(v.composite![0]!.peculiarities).toEqual(['p:'])
  })

  it('keeps Keenan\'s "+" after a subtype as a shift, not a companion', () => {
    const v = read('K0+IIIb')
    expect(v.type.points[0]!.shift).toBe('+')
    expect(v.typeCode).toBe(50)
    expect(v.composite).toBeUndefined()
  })

  it('reads white dwarfs outside the MK grid', () => {
    const v = read('DA3.4')
    expect(v.kind).toBe('white-dwarf')
    expect(v.letter).toBe('DA')
    expect(v.subtype).toBe(3.4)
    expect(v.typeCode).toBeUndefined()
    expect(read('DZ7.5').letter).toBe('DZ')
    expect(read('DBQA5').letter).toBe('DBQA')
  })

  it('reads carbon types, old and revised, with their indices', () => {
    const old = read('C5,4')
    expect(old.kind).toBe('carbon')
    expect(old.subtype).toBe(5)
    expect(old.type.index).toBe('4')
    expect(read('C-N5').letter).toBe('C-N')
    expect(read('C-Hd1II:').luminosityClass).toBe('II')
    expect(read('R5').kind).toBe('carbon')
  })

  it('reads S types with the Keenan–Boeshaar index', () => {
    const v = read('S4/2')
    expect(v.kind).toBe('s-type')
    expect(v.subtype).toBe(4)
    expect(v.type.index).toBe('2')
    expect(read('MS3').letter).toBe('MS')
    expect(read('SC5-8e').letter).toBe('SC')
  })

  it('reads Wolf–Rayet types with their qualifiers', () => {
    const v = read('WN7h')
    expect(v.kind).toBe('wolf-rayet')
    expect(v.letter).toBe('WN')
    expect(v.peculiarities).toEqual(['h'])
    expect(read('WN3h-w').peculiarities).toEqual(['h', '-w'])
    expect(read('WC7+O5-8').composite![0]!.typeRange).toEqual([5, 8])
  })

  it('reads subdwarf and other prefixes', () => {
    expect(read('sdB5').prefix).toBe('sd')
    expect(read('sdB5').typeCode).toBe(15)
    expect(read('esdM1').prefix).toBe('esd')
    expect(read('dF8').prefix).toBe('d')
    expect(read('gG7').prefix).toBe('g')
  })

  it("reads Walborn's O-star qualifiers", () => {
    expect(read('O3V((f*))z').peculiarities).toEqual(['((f*))', 'z'])
    expect(read('O6.5III(f)').peculiarities).toEqual(['(f)'])
    expect(read('O4If+O9.5II').composite).toHaveLength(1)
    const on = read('ON9.2V')
    expect(on.cnType).toBe('N')
    expect(on.typeCode).toBe(9.2)
  })

  it('reads bracketed notes such as B[e]', () => {
    expect(read('B8[e]').peculiarities).toEqual(['[e]'])
  })

  it('reads a single digit as an MK subtype, so "G30-Ia" is G3 with class 0-Ia', () => {
    const v = read('G30-Ia')
    expect(v.typeCode).toBe(43)
    expect(v.luminosityClass).toBe('0-Ia')
  })

  it('ignores whitespace', () => {
    expect(read(' K1.5 IIIb ')).toEqual(read('K1.5IIIb'))
  })

  it.each([
    ['', 'empty spectral type'],
    ['   ', 'empty spectral type'],
    ['XYZ', 'no spectral type at "XYZ"'],
    ['A0V(', 'an unclosed parenthesis'],
    ['A0V)', 'a closing parenthesis without an opening one'],
    ['K0IIIq7', 'cannot read "7" at character 7'],
  ])('refuses %j with the reason %j', (text, reason) => {
    const r = parseMK(text)
    expect(r).toEqual({ ok: false, reason })
  })
})

describe('formatMK', () => {
  it.each([
    ['K1.5IIIb', 'K1.5 IIIb'],
    ['B8III', 'B8 III'],
    ['A0V', 'A0 V'],
    ['A0 V', 'A0 V'],
    ['G8/K0III', 'G8/K0 III'],
    ['B6/B7Ve', 'B6/7 V e'],
    ['K0IV-V', 'K0 IV-V'],
    ['B9:III', 'B9: III'],
    ['A(3)(V)', 'A3: V:'],
    ['G8IIIBa0.5', 'G8 III Ba0.5'],
    ['A0VpSiSrCr', 'A0 V pSiSrCr'],
    ['kA2hA5mA7V', 'kA2hA5 V mA7'],
    ['A0V+G5III', 'A0 V + G5 III'],
    ['DA3.4', 'DA3.4'],
    ['C5,4', 'C5,4'],
    ['ON9.2V', 'ON9.2 V'],
    ['A0Ia/ab', 'A0 Ia/Iab'],
  ])('writes %s as %s', (text, canonical) => {
    expect(formatMK(read(text))).toBe(canonical)
  })
})

describe('typeCodeOf', () => {
  it('numbers types from O0 = 0 in steps of ten per letter', () => {
    expect(typeCodeOf('O', 9)).toBe(9)
    expect(typeCodeOf('B', 8)).toBe(18)
    expect(typeCodeOf('K', 1.5)).toBe(51.5)
    expect(typeCodeOf('M', 0)).toBe(60)
  })
  it('has no code for letters outside the MK sequence', () => {
    expect(typeCodeOf('DA', 3)).toBeUndefined()
  })
})

describe('typeFromCode', () => {
  it('inverts typeCodeOf', () => {
    expect(typeFromCode(51.5)).toEqual({ letter: 'K', subtype: 1.5 })
    expect(typeFromCode(18)).toEqual({ letter: 'B', subtype: 8 })
  })
  it('refuses codes outside 0–99.99', () => {
    expect(() => typeFromCode(-1)).toThrow('type code -1 is outside 0–99.99')
    expect(() => typeFromCode(Number.NaN)).toThrow('type code NaN is outside 0–99.99')
  })
})

describe('formatTypeCode', () => {
  it('writes a code as letter and subtype', () => {
    expect(formatTypeCode(42)).toBe('G2')
    expect(formatTypeCode(51.5)).toBe('K1.5')
    expect(formatTypeCode(9.7)).toBe('O9.7')
  })
})

describe('neighbourType', () => {
  it('steps one subtype each way', () => {
    expect(neighbourType(42, 1)).toBe(43)
    expect(neighbourType(42, -1)).toBe(41)
    expect(neighbourType(49, 1)).toBe(50)
  })
  it('stays within O0–M9 by default', () => {
    expect(neighbourType(0, -1)).toBe(0)
    expect(neighbourType(69, 1)).toBe(69)
  })
  it('takes a step size for half subtypes', () => {
    expect(neighbourType(51.5, 1, { step: 0.5 })).toBe(52)
  })
})

describe('classCodeOf', () => {
  it('gives the documented codes', () => {
    expect(LUMINOSITY_CLASSES.map((c) => classCodeOf(c.text))).toEqual(LUMINOSITY_CLASSES.map((c) => c.code))
    expect(classCodeOf('IV-V')).toBe(5.5)
    expect(classCodeOf('I')).toBe(1.5)
  })
  it('has no code for text that is not a class', () => {
    expect(classCodeOf('X')).toBeUndefined()
    expect(classCodeOf('IIIx')).toBeUndefined()
  })
})

describe('neighbourClass', () => {
  it('steps along the list of classes', () => {
    expect(neighbourClass('III', 1)).toBe('IV')
    expect(neighbourClass('III', -1)).toBe('II')
    expect(neighbourClass('Ib', -1)).toBe('Iab')
  })
  it('stops at the ends of the list', () => {
    expect(neighbourClass('VI', 1)).toBe('VI')
    expect(neighbourClass('0', -1)).toBe('0')
  })
  it('refuses text that is not a class', () => {
    expect(() => neighbourClass('Q', 1)).toThrow('"Q" is not a luminosity class')
  })
})
