"""Request and response schemas of the API (pydantic), kept apart from the DB models.

One family per entity: ``XCreate`` (POST body), ``XUpdate`` (PATCH, all optional),
``XPublic`` (what the API returns).
"""
