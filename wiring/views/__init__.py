"""Pages of the wiring record, one module per feature; each declares its urlpatterns."""
