"""Short cautions shown wherever results are shown (summary, report, figures)."""

CAUTION = (
    "Caution: estimates from published empirical models; verify by hardness testing to the applicable "
    "standard and defer to local codes, plant procedures and a qualified metallurgist before production. "
    "Quenching hazards: oil fires (bath well below flash point, full immersion, cover and extinguisher at hand), "
    "steam and splashing from water and brine, burns from hot parts, quench cracking of high-carbon or "
    "sharp-cornered parts in severe quenchants."
)

SHORT_CAUTION = ("Estimates from published models: verify by hardness test; follow local codes and a qualified "
                 "metallurgist. Quench hazards: oil fire, steam, burns, cracking.")
