"""Case files: the Case data model, loading a TOML case and checking every key.

Layer 2. Turns a case file into SI floats, one error line per problem. May import the physics
layer and below; knows no solver.
"""
