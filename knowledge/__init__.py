"""Bundled knowledge of faultwise: YAML data only (graph, symptoms, cautions, tubes, demo sets).

It is installed as the package ``faultwise.knowledge`` so that a non-editable install finds it.
"""
