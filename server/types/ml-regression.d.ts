// ml-regression 6.3 ships no type declarations; the classes it re-exports do.
declare module 'ml-regression' {
  export { PolynomialRegression } from 'ml-regression-polynomial'
}
