"""Families of systems F(x; p): where members are singular (the discriminant) and what members do between
(regions, sweeps by parameter homotopy). After ``singular`` in the pipeline: it uses the singular locus's
formulations on the incidence system and the witness machinery for the projection to parameter space."""
