"""Eight natural-gas compositions, lean to rich, with nitrogen and carbon dioxide (invented for the tests and
the bench; mole fractions). 'known_slow' and 'c5_slow' are ones whose Helmholtz-energy phase envelope does not
finish here (the tracer runs on with memory growing)."""
NATURAL_GASES = {
    "lean": {"Methane": 0.95, "Ethane": 0.03, "Propane": 0.005, "Nitrogen": 0.01, "CarbonDioxide": 0.005},
    "known_slow": {"Methane": 0.87, "Ethane": 0.06, "Propane": 0.03, "n-Butane": 0.01, "Nitrogen": 0.03},
    "c3": {"Methane": 0.90, "Ethane": 0.05, "Propane": 0.02, "Nitrogen": 0.02, "CarbonDioxide": 0.01},
    "c4": {"Methane": 0.85, "Ethane": 0.07, "Propane": 0.03, "IsoButane": 0.01, "n-Butane": 0.01, "Nitrogen": 0.02,
           "CarbonDioxide": 0.01},
    "c5_slow": {"Methane": 0.80, "Ethane": 0.09, "Propane": 0.05, "n-Butane": 0.02, "n-Pentane": 0.01,
                "Nitrogen": 0.01, "CarbonDioxide": 0.02},
    "rich": {"Methane": 0.75, "Ethane": 0.10, "Propane": 0.07, "IsoButane": 0.02, "n-Butane": 0.02,
             "Isopentane": 0.01, "n-Pentane": 0.01, "Nitrogen": 0.01, "CarbonDioxide": 0.01},
    "high_co2": {"Methane": 0.82, "Ethane": 0.04, "Propane": 0.02, "Nitrogen": 0.02, "CarbonDioxide": 0.10},
    "high_n2": {"Methane": 0.83, "Ethane": 0.03, "Propane": 0.01, "Nitrogen": 0.12, "CarbonDioxide": 0.01},
}
