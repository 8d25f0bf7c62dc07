"""Pages of the inspections app, one module per feature; each declares its urlpatterns."""
