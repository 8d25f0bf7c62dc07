from __future__ import annotations

from django.contrib import admin
from django.contrib.auth import views as auth_views
from django.urls import include, path
from django.views.generic import RedirectView

from shop.views import jobs, records, staff

urlpatterns = [
    path("", RedirectView.as_view(pattern_name="job_list", permanent=False)),
    path("login/", auth_views.LoginView.as_view(redirect_authenticated_user=True), name="login"),
    path("logout/", auth_views.LogoutView.as_view(), name="logout"),
    # Every staff member changes their own password here; nobody sets another's.
    path("account/password/", staff.password_change, name="password_change"),
    path("account/password/done/", staff.password_change_done, name="password_change_done"),
    # Where the office's password-set link (shop.services.staff_send_password_link) leads.
    path(
        "account/set-password/<uidb64>/<token>/",
        staff.password_set,
        name="password_reset_confirm",
    ),
    path("account/set-password/done/", staff.password_set_done, name="password_reset_complete"),
    path("staff/", staff.staff_list, name="staff_list"),
    path("staff/new/", staff.staff_new, name="staff_new"),
    path("staff/<int:pk>/", staff.staff_detail, name="staff_detail"),
    path("staff/<int:pk>/role/", staff.staff_role, name="staff_role"),
    path("staff/<int:pk>/active/", staff.staff_active, name="staff_active"),
    path("staff/<int:pk>/password-link/", staff.staff_password_link, name="staff_password_link"),
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
    path("", include("inspections.urls")),
    path("", include("insights.urls")),
    path("", include("wiring.urls")),
    path("", include("reminders.urls")),
    path("admin/", admin.site.urls),
]

# Error pages in plain words (shop/views/errors.py); a 403 says why and is logged.
handler400 = "shop.views.errors.bad_request"
handler403 = "shop.views.errors.forbidden"
handler404 = "shop.views.errors.page_not_found"
