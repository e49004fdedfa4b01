// @lhncbc/ucum-lhc ships no types; this declares the part Tidemark uses.
declare module '@lhncbc/ucum-lhc' {
  interface ConvertResult {
    status: 'succeeded' | 'failed' | 'error';
    toVal: number | null;
    msg: string[];
  }
  interface ValidateResult {
    status: 'valid' | 'invalid' | 'error';
    ucumCode: string | null;
    msg: string[];
    suggestions?: unknown;
  }
  interface UcumLhcUtils {
    convertUnitTo(
      fromUnit: string,
      fromVal: number,
      toUnit: string,
      options?: { molecularWeight?: number; charge?: number },
    ): ConvertResult;
    validateUnitString(unit: string, suggest?: boolean): ValidateResult;
  }
  const ucum: { UcumLhcUtils: { getInstance(): UcumLhcUtils } };
  export default ucum;
}
