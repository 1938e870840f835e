// Minimal types for convert-units 2.x, which ships none; the tests use it as an independent cross-check.
declare module 'convert-units' {
  interface Converter {
    from(unit: string): { to(unit: string): number }
  }
  export default function convert(value: number): Converter
}
