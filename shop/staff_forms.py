"""Forms of the staff pages. They only read what is typed; shop.services checks who may do
what and writes. There is deliberately no field for a password or for the staff or
superuser flags: a posted `is_superuser=on` is simply not read."""

from __future__ import annotations

from django import forms
from django.contrib.auth.validators import UnicodeUsernameValidator

from shop import roles

ROLE_CHOICES = [(role, role) for role in roles.ROLES]


class StaffCreateForm(forms.Form):
    username = forms.CharField(
        max_length=150,
        validators=[UnicodeUsernameValidator()],
        help_text="What they type to sign in: letters, digits and @ . + - _ only.",
    )
    first_name = forms.CharField(max_length=150, required=False)
    last_name = forms.CharField(max_length=150, required=False)
    email = forms.EmailField(
        label="E-mail", max_length=254, help_text="The password-set link is sent here."
    )
    role = forms.ChoiceField(choices=ROLE_CHOICES)
    send_link = forms.BooleanField(
        label="Send the password-set link now", required=False, initial=True
    )


class StaffRoleForm(forms.Form):
    role = forms.ChoiceField(choices=ROLE_CHOICES)
