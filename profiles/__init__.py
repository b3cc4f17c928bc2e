"""Data package: the profile TOML files (tooth systems, fabrication, materials).

Installed as ``gearcad.profile_data`` so the files travel with the package.
"""
