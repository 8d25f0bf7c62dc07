from __future__ import annotations

from django.contrib import admin
from django.contrib.auth import views as auth_views
from django.urls import include, path
from django.views.generic import RedirectView

from shop.views import jobs, records

urlpatterns = [
    path("", RedirectView.as_view(pattern_name="job_list", permanent=False)),
    path("login/", auth_views.LoginView.as_view(redirect_authenticated_user=True), name="login"),
    path("logout/", auth_views.LogoutView.as_view(), name="logout"),
    path("jobs/", jobs.job_list, name="job_list"),
    path("jobs/new/", jobs.job_new, name="job_new"),
    path("jobs/<str:number>/", jobs.job_detail, name="job_detail"),
    path("jobs/<str:number>/edit/", jobs.job_edit, name="job_edit"),
    path("owners/", records.owner_list, name="owner_list"),
    path("owners/new/", records.owner_new, name="owner_new"),
    path("owners/<int:pk>/", records.owner_detail, name="owner_detail"),
    path("owners/<int:pk>/edit/", records.owner_edit, name="owner_edit"),
    path("vehicles/new/", records.vehicle_new, name="vehicle_new"),
    path("vehicles/<int:pk>/", records.vehicle_detail, name="vehicle_detail"),
    path("vehicles/<int:pk>/edit/", records.vehicle_edit, name="vehicle_edit"),
    path("", include("circuits.urls")),
    path("admin/", admin.site.urls),
]
