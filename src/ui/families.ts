/**
 * The divergence families of DivergenceCalculator (./divergence-calculator.ts): their names, labels,
 * parameters and defining formulas (TeX). Plain data, free of the DOM, so that the build step that
 * writes the embed's formulas (scripts/write-formulas.ts) and its test can read it in Node.
 */
/** The families, whether they take α (and z), and their defining formulas (standard forms of the literature). */
export const FAMILIES: { name: string; label: string; alpha: boolean; z?: boolean; tex: string }[] = [
  { name: 'umegaki', label: 'Umegaki relative entropy', alpha: false, tex: String.raw`D(\rho\|\sigma) = \operatorname{Tr}\rho\,(\log\rho - \log\sigma)` },
  { name: 'petz', label: 'Petz Rényi', alpha: true, tex: String.raw`\bar D_\alpha(\rho\|\sigma) = \frac{1}{\alpha-1}\log\frac{\operatorname{Tr}\rho^\alpha\sigma^{1-\alpha}}{\operatorname{Tr}\rho}` },
  { name: 'sandwiched', label: 'Sandwiched Rényi', alpha: true, tex: String.raw`\tilde D_\alpha(\rho\|\sigma) = \frac{1}{\alpha-1}\log\frac{\operatorname{Tr}\big(\sigma^{\frac{1-\alpha}{2\alpha}}\rho\,\sigma^{\frac{1-\alpha}{2\alpha}}\big)^{\alpha}}{\operatorname{Tr}\rho}` },
  { name: 'alpha-z', label: 'α-z Rényi', alpha: true, z: true, tex: String.raw`D_{\alpha,z}(\rho\|\sigma) = \frac{1}{\alpha-1}\log\frac{\operatorname{Tr}\big(\sigma^{\frac{1-\alpha}{2z}}\rho^{\frac{\alpha}{z}}\sigma^{\frac{1-\alpha}{2z}}\big)^{z}}{\operatorname{Tr}\rho}` },
  { name: 'geometric', label: 'Geometric Rényi', alpha: true, tex: String.raw`\hat D_\alpha(\rho\|\sigma) = \frac{1}{\alpha-1}\log\frac{\operatorname{Tr}\sigma\big(\sigma^{-\frac12}\rho\,\sigma^{-\frac12}\big)^{\alpha}}{\operatorname{Tr}\rho}` },
  { name: 'max', label: 'Max-relative entropy', alpha: false, tex: String.raw`D_{\max}(\rho\|\sigma) = \log\min\{\lambda : \rho \le \lambda\sigma\}` },
  { name: 'min', label: 'Min-relative entropy', alpha: false, tex: String.raw`D_{\min}(\rho\|\sigma) = -\log\operatorname{Tr}\Pi_\rho\,\sigma` },
  { name: 'measured', label: 'Measured relative entropy', alpha: false, tex: String.raw`D^{\mathbb M}(\rho\|\sigma) = \sup_{\{M_x\}} \sum_x \operatorname{Tr}\rho M_x \log\frac{\operatorname{Tr}\rho M_x}{\operatorname{Tr}\sigma M_x}` },
];
