"""The physics layer: gas models (ideal, CoolProp), closed-system processes, steady-flow legs and their
real-gas path integration, staging. SI floats in and out; no job file, no report."""
